/**
 * Crash safety: the CLI run as a child process and killed with SIGKILL (no chance to clean up) at
 * seeded random moments of calibrate, quantify --csv and recheck, many times. After every kill:
 * - calibrate --force: the calibration file is byte for byte the previous one or the complete new
 *   one (which verifies);
 * - quantify --csv --force: the results file is byte for byte the previous one or the complete
 *   new one;
 * - recheck: the history reads without error and holds the previous records, or those plus the
 *   one complete record of the killed run; a lock left by the killed run does not block the next.
 * Files besides these may only be the writers' hidden temporaries (`.<name>.tmp-…`,
 * `.<name>.partial-…`) and, until the next recheck breaks it, the history's stale lock.
 */
import { spawn } from 'node:child_process';
import { cpSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readCalibration } from '../../src/store/calibration-file.js';
import { readHistory } from '../../src/store/history.js';
import { createRandom } from '../../src/simulate/random.js';
import { temporaryFolder } from '../helpers/cli.js';

/** Seed of the kill delays; printed in the test names. */
const SEED = 20_261_202;
/** Kills per command. */
const KILLS = 30;

const repository = resolve(import.meta.dirname, '..', '..');
const folder = temporaryFolder('bandwright-crash-');
const at = (name: string): string => join(folder.path, name);
const band = ['--gas', 'CO', '--band', '2040:2245', '--baseline', '2000:2030,2255:2290'];
// Fixed creation time (reproducible-builds convention), so a completed run's output is known byte for byte.
const environment = { ...process.env, SOURCE_DATE_EPOCH: '1793520000' };

interface ChildRun {
  status: number | null;
  killed: boolean;
  stderr: string;
  ms: number;
}

/** Runs `bandwright <args>` from source in a child process, killing it with SIGKILL after `killAfterMs` when given. */
function runChild(args: readonly string[], killAfterMs?: number): Promise<ChildRun> {
  return new Promise((done, fail) => {
    const started = performance.now();
    const child = spawn(process.execPath, ['--import', 'tsx', join('src', 'cli', 'main.ts'), ...args], {
      cwd: repository,
      env: environment,
      stdio: ['ignore', 'ignore', 'pipe'],
    });
    let stderr = '';
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString()));
    const timer =
      killAfterMs === undefined ? undefined : setTimeout(() => child.kill('SIGKILL'), killAfterMs);
    child.on('error', fail);
    child.on('close', (status, signal) => {
      if (timer !== undefined) clearTimeout(timer);
      done({ status, killed: signal === 'SIGKILL', stderr, ms: performance.now() - started });
    });
  });
}

/** Files in the folder that are neither the inputs nor the named outputs: must be writers' temporaries. */
function strayFiles(keep: readonly string[]): string[] {
  return readdirSync(folder.path).filter(
    (name) => !keep.includes(name) && !/^\.[^/]+\.(tmp|partial)-/.test(name),
  );
}

const inputs = ['s0.csv', 's50.csv', 's100.csv', 's200.csv', 's400.csv', 'standards.csv', 'samples'];
const summaries: string[] = [];

beforeAll(() => {
  const lab = join(repository, 'tests', 'fixtures', 'bad', 'lab');
  for (const name of inputs.slice(0, 6)) cpSync(join(lab, name), at(name));
  // Enough sample scans that quantify spends a while reading before it writes its results.
  mkdirSync(at('samples'));
  for (let i = 0; i < 200; i++)
    cpSync(
      join(lab, `s${[50, 100, 200][i % 3]}.csv`),
      at(join('samples', `sample-${String(i).padStart(3, '0')}.csv`)),
    );
});
afterAll(() => {
  for (const line of summaries) console.log(line);
  folder.cleanup();
});

/** Kills the same command KILLS times at seeded moments over [0, 1.5 × its full run time]; checks after each. */
async function killRepeatedly(
  name: string,
  seed: number,
  fullMs: number,
  args: (i: number) => string[],
  check: (i: number, run: ChildRun) => void,
): Promise<void> {
  const random = createRandom(seed);
  let killed = 0;
  let completed = 0;
  for (let i = 0; i < KILLS; i++) {
    const delay = random() * 1.5 * fullMs;
    const run = await runChild(args(i), delay);
    if (run.killed) killed++;
    else completed++;
    check(i, run);
  }
  const temporaries = readdirSync(folder.path).filter((file) => /^\.[^/]+\.(tmp|partial)-/.test(file)).length;
  summaries.push(
    `crash safety ${name}: ${KILLS} runs with SIGKILL at seeded moments (seed ${seed}) over 0–${(1.5 * fullMs).toFixed(0)} ms: ${killed} killed, ${completed} finished first; invariants held after every run; writer temporaries left so far: ${temporaries}`,
  );
}

describe(`crash safety: SIGKILL at random moments (seed ${SEED}, ${KILLS} kills per command)`, () => {
  it('calibrate --force: the calibration is the previous one or the complete new one', async () => {
    const target = at('co.calibration.json');
    const fresh = await runChild(['calibrate', at('standards.csv'), ...band, '-o', target]);
    expect(fresh.status, fresh.stderr).toBe(0);
    const next = readFileSync(target, 'utf8');
    const before = await runChild([
      'calibrate',
      at('standards.csv'),
      ...band,
      '--model',
      'origin',
      '-o',
      target,
      '--force',
    ]);
    expect(before.status, before.stderr).toBe(0);
    const previous = readFileSync(target, 'utf8');
    expect(previous).not.toBe(next);
    await killRepeatedly(
      'calibrate',
      SEED,
      fresh.ms,
      () => ['calibrate', at('standards.csv'), ...band, '-o', target, '--force'],
      (_i, run) => {
        const now = readFileSync(target, 'utf8');
        expect(
          [previous, next],
          `after a run ${run.killed ? 'killed' : 'that finished'} after ${run.ms.toFixed(0)} ms`,
        ).toContain(now);
        if (!run.killed) expect(run.status, run.stderr).toBe(0);
        expect(readCalibration(target).sha256).toMatch(/^[0-9a-f]{64}$/);
        expect(strayFiles([...inputs, 'co.calibration.json'])).toEqual([]);
        // Put the previous calibration back so every run replaces it again.
        if (now === next) writeFileSync(target, previous);
      },
    );
  }, 300_000);

  it('quantify --csv --force: the results file is the previous one or the complete new one', async () => {
    const calibration = at('co.calibration.json');
    const target = at('results.csv');
    const fresh = await runChild(['quantify', calibration, at('samples'), '--csv', target]);
    expect(fresh.status, fresh.stderr).toBe(0);
    const next = readFileSync(target, 'utf8');
    expect(next.trimEnd().split('\n')).toHaveLength(201);
    const previous =
      'scan,CO_ppm,CO_low,CO_high,CO_flags,residual_rms,calibration_sha256,error\nearlier.csv,1,0.9,1.1,,0,0000,\n';
    writeFileSync(target, previous);
    await killRepeatedly(
      'quantify --csv',
      SEED + 1,
      fresh.ms,
      () => ['quantify', calibration, at('samples'), '--csv', target, '--force'],
      (_i, run) => {
        const now = readFileSync(target, 'utf8');
        expect(
          [previous, next],
          `after a run ${run.killed ? 'killed' : 'that finished'} after ${run.ms.toFixed(0)} ms`,
        ).toContain(now);
        if (!run.killed) expect(run.status, run.stderr).toBe(0);
        expect(strayFiles([...inputs, 'co.calibration.json', 'results.csv'])).toEqual([]);
        if (now === next) writeFileSync(target, previous);
      },
    );
  }, 300_000);

  it('recheck: the history reads, with the previous records or one complete record more; the next recheck is not blocked', async () => {
    const calibration = at('co.calibration.json');
    const history = at('co.calibration.history.csv');
    const check = (day: number): string[] => [
      'recheck',
      calibration,
      at('s100.csv'),
      '--certified',
      '100',
      '--at',
      new Date(Date.UTC(2026, 5, 1 + day, 9)).toISOString(),
    ];
    const first = await runChild(check(0));
    expect([0, 3, 4], first.stderr).toContain(first.status);
    let records = readHistory(history).records.length;
    expect(records).toBe(1);
    await killRepeatedly(
      'recheck',
      SEED + 2,
      first.ms,
      (i) => check(i + 1),
      (i, run) => {
        const now = readHistory(history).records;
        expect(
          [records, records + 1],
          `after a run ${run.killed ? 'killed' : 'that finished'} after ${run.ms.toFixed(0)} ms`,
        ).toContain(now.length);
        if (now.length === records + 1) expect(now[now.length - 1]?.time).toBe(check(i + 1)[6]);
        if (!run.killed) expect([0, 3, 4], run.stderr).toContain(run.status);
        records = now.length;
        expect(
          strayFiles([
            ...inputs,
            'co.calibration.json',
            'results.csv',
            'co.calibration.history.csv',
            'co.calibration.history.csv.lock',
          ]),
        ).toEqual([]);
      },
    );
    const last = await runChild(check(KILLS + 1));
    expect([0, 3, 4], last.stderr).toContain(last.status);
    expect(readHistory(history).records).toHaveLength(records + 1);
    expect(readdirSync(folder.path)).not.toContain('co.calibration.history.csv.lock');
  }, 300_000);
});
