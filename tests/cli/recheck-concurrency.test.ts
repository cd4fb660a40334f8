/**
 * Concurrency and crashes: parallel `recheck` processes on one calibration give one intact
 * record each; a record torn by a killed writer is reported, and nothing is appended after it.
 *
 * Each process is a separate `node` running the CLI from source (tsx), as cron jobs or CI runners
 * would start them. Sources: POSIX open(2) O_EXCL for the lock file and O_APPEND for the record
 * (common practice for append-only logs shared between processes).
 */
import { spawn } from 'node:child_process';
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readHistory } from '../../src/store/history.js';
import { BAND_OPTIONS, bandScan, writeScan, writeStandardSeries } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import type { RecheckDocument } from '../helpers/documents.js';
import { parseJsonAs, readJsonAs } from '../helpers/json.js';
import type { Calibration } from '../../src/calibration/calibration.js';

const folder = temporaryFolder('bandwright-concurrency-');
const at = (name: string) => join(folder.path, name);
const reference = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const repository = fileURLToPath(new URL('../../', import.meta.url));
const mainScript = join(repository, 'src/cli/main.ts');
const PROCESSES = 6;

/** Runs the CLI in a child process. */
function runProcess(args: string[]): Promise<{ status: number | null; stdout: string; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', mainScript, ...args], {
      cwd: repository,
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (chunk: Buffer) => (stdout += chunk.toString()));
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString()));
    child.on('error', reject);
    child.on('close', (status) => resolve({ status, stdout, stderr }));
  });
}

beforeAll(async () => {
  writeStandardSeries(at, reference);
  for (let k = 0; k < PROCESSES; k++)
    writeScan(at(`check-${k}.csv`), bandScan(99.5 + 0.2 * k, { metadata: reference }));
  const run = await runCli('calibrate', at('standards.csv'), ...BAND_OPTIONS, '-o', at('co.json'));
  expect(run.status, run.stderr).toBe(0);
});
afterAll(() => folder.cleanup());

describe('parallel rechecks on one calibration', () => {
  it(`${PROCESSES} processes at once give ${PROCESSES} intact records, none lost or interleaved`, async () => {
    const times = Array.from(
      { length: PROCESSES },
      (_, k) => `2026-09-${String(1 + k).padStart(2, '0')}T09:30:00.000Z`,
    );
    const runs = await Promise.all(
      times.map((time, k) =>
        runProcess([
          'recheck',
          at('co.json'),
          at(`check-${k}.csv`),
          '--certified',
          '100',
          '--at',
          time,
          '--json',
        ]),
      ),
    );
    for (const run of runs) expect([0, 3], run.stderr).toContain(run.status);
    const text = readFileSync(at('co.history.csv'), 'utf8');
    expect(text.endsWith('\n')).toBe(true);
    // Every line is a whole record (the reader refuses torn, merged or damaged lines).
    const history = readHistory(at('co.history.csv'), {
      calibrationSha256: readJsonAs<Calibration>(at('co.json')).sha256,
    });
    expect(history.records).toHaveLength(PROCESSES);
    expect(history.records.map((r) => r.time).sort()).toEqual(times);
    expect(history.records.map((r) => r.line)).toEqual(Array.from({ length: PROCESSES }, (_, k) => k + 3));
    // Each process saw the records appended before its own: the line it reports is where its record is.
    const reported = runs.map((run) => parseJsonAs<RecheckDocument>(run.stdout));
    for (const result of reported) {
      const onLine = history.records.find((r) => r.line === result.history.line);
      expect(onLine?.time).toBe(result.time);
    }
    expect(reported.map((r) => r.history.checks).sort((a, b) => a - b)).toEqual(
      Array.from({ length: PROCESSES }, (_, k) => k + 1),
    );
    // Exactly one process created the history.
    expect(runs.filter((run) => parseJsonAs<RecheckDocument>(run.stdout).history.created)).toHaveLength(1);
    expect(
      readdirSync(folder.path).filter((name) => name.includes('.lock') || name.includes('.tmp-')),
    ).toEqual([]);
  }, 120_000);

  it('serialises read-judge-append under contention: 4 processes × 25 appends each see every earlier record', async () => {
    // Each append records how many records it saw before it (measured = count). If two appends ever
    // overlapped, two records would carry the same count and one count would be missing.
    const script = at('append-many.ts');
    const history = at('stress.history.csv');
    writeFileSync(
      script,
      [
        `import { appendHistoryRecord } from ${JSON.stringify(join(repository, 'src/store/history.ts'))};`,
        `for (let i = 0; i < 25; i++) {`,
        `  appendHistoryRecord(${JSON.stringify(history)}, { calibrationSha256: '${'f'.repeat(64)}', complete: (records) => ({`,
        `    time: new Date(Date.UTC(2026, 0, 1) + records.length * 3600e3).toISOString(), recordedAt: new Date().toISOString(), gas: 'CO', unit: 'ppm',`,
        `    certified: 100, measured: records.length, low: 0, high: 1, se: 0.1, verdict: 'pass', rules: [], tolerancePct: 5,`,
        `    scan: 'writer-' + process.pid, scanSha256: '${'0'.repeat(64)}', toolVersion: '0.1.0' }) });`,
        `}`,
      ].join('\n'),
    );
    const writers = await Promise.all(
      Array.from(
        { length: 4 },
        () =>
          new Promise<number | null>((resolve, reject) => {
            const child = spawn(process.execPath, ['--import', 'tsx', script], {
              cwd: repository,
              stdio: ['ignore', 'ignore', 'inherit'],
            });
            child.on('error', reject);
            child.on('close', resolve);
          }),
      ),
    );
    expect(writers).toEqual([0, 0, 0, 0]);
    const records = readHistory(history).records;
    expect(records).toHaveLength(100);
    expect(records.map((r) => r.measured)).toEqual(Array.from({ length: 100 }, (_, k) => k));
    // All four writers took turns (not one after the other only by luck of start-up).
    expect(new Set(records.map((r) => r.scan)).size).toBe(4);
  }, 120_000);

  it('reports a record torn by a writer killed mid-line, and appends nothing after it', async () => {
    const path = at('co.history.csv');
    const whole = readFileSync(path, 'utf8');
    // What a crash during the single write of a line leaves: the start of the line, no end of line.
    const partial = `${whole}2026-09-20T09:30:00.000Z,2026-09-20T09:30:01.000Z,CO,ppm,100,99.8`;
    writeFileSync(path, partial);
    const run = await runProcess([
      'recheck',
      at('co.json'),
      at('check-0.csv'),
      '--certified',
      '100',
      '--at',
      '2026-09-21T09:30:00Z',
    ]);
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(
      new RegExp(`co\\.history\\.csv line ${PROCESSES + 3}: the last line is incomplete`),
    );
    expect(readFileSync(path, 'utf8')).toBe(partial);
    expect(existsSync(`${path}.lock`)).toBe(false);
    const status = await runProcess(['status', at('co.json'), '--now', '2026-09-22T00:00:00Z']);
    expect(status.status).toBe(1);
    expect(status.stderr).toMatch(/line \d+: the last line is incomplete/);
  }, 60_000);
});
