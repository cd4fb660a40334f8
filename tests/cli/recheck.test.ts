/**
 * `bandwright recheck` end to end: quantify a check scan, judge it, append it to the history,
 * exit 0/3/4; bad input refused with a message, a status and no file written or changed.
 *
 * Known truth: each scan holds a Gaussian band whose area is analytic and proportional to the
 * concentration (tests/helpers/band-scans.ts), so a scan made at 96.5 ppm checked against a
 * certified 100 ppm has a recovery of 96.5 % (recovery = measured/certified × 100, common
 * practice). Rules: Westgard et al., Clinical Chemistry 27 (1981) 493; σ = tolerance/3 before the
 * baseline exists unless the check's own standard error is larger (DESIGN §3, src/drift/sigma.ts). Exit statuses: DESIGN §4. SHA-256 cross-checked with node:crypto.
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BAND_OPTIONS, bandScan, writeScan, writeStandardSeries } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import type { RecheckDocument } from '../helpers/documents.js';
import { parseJsonAs, readJsonAs } from '../helpers/json.js';
import type { Calibration } from '../../src/calibration/calibration.js';

const folder = temporaryFolder('bandwright-recheck-');
const at = (name: string) => join(folder.path, name);
const reference = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const bandArgs = BAND_OPTIONS;

async function calibrate(name: string): Promise<string> {
  const run = await runCli('calibrate', at('standards.csv'), ...bandArgs, '-o', at(name));
  expect(run.status, run.stderr).toBe(0);
  return at(name);
}

beforeAll(() => {
  writeStandardSeries(at, reference);
  for (const ppm of [0, 93, 96.5, 99.6, 100, 100.4])
    writeScan(at(`check-${ppm}.csv`), bandScan(ppm, { metadata: reference }));
  writeScan(at('bare.csv'), bandScan(100, { metadata: {} }));
});
afterAll(() => folder.cleanup());

function recheckJson(run: { stdout: string }): RecheckDocument {
  return parseJsonAs<RecheckDocument>(run.stdout);
}

describe('a recheck', () => {
  it('quantifies the check, judges it, writes the history and gives the next due date (pass, exit 0)', async () => {
    const calibration = await calibrate('pass.json');
    const run = await runCli(
      'recheck',
      calibration,
      at('check-100.4.csv'),
      '--certified',
      '100',
      '--at',
      '2026-09-01T09:30Z',
      '--json',
    );
    expect(run.status, run.stderr).toBe(0);
    const result = recheckJson(run);
    // DESIGN §4 fields.
    expect(Object.keys(result)).toEqual(
      expect.arrayContaining([
        'measured',
        'certified',
        'recoveryPct',
        'low',
        'high',
        'verdict',
        'rules',
        'nextDue',
        'trend',
      ]),
    );
    expect(result.certified).toBe(100);
    expect(Math.abs(result.measured - 100.4)).toBeLessThan(0.3);
    expect(Math.abs(result.recoveryPct! - 100.4)).toBeLessThan(0.3);
    expect(result.low).toBeLessThan(result.measured);
    expect(result.high).toBeGreaterThan(result.measured);
    expect(result.verdict).toBe('pass');
    expect(result.rules).toEqual([]);
    expect(result.nextDue).toBe('2026-09-08T09:30:00.000Z');
    expect(result.trend.status).toBe('insufficient');
    // Before the baseline, σ is tolerance/3 unless the check's own standard error is larger.
    expect(result.sigma?.basis).toBe('floor');
    expect(result.sigma?.checkSePct).toBeCloseTo((result.se / 100) * 100, 12);
    expect(result.sigma?.valuePct).toBeCloseTo(5 / 3, 12);
    expect(result.z).toBeCloseTo((result.measured - 100) / result.se, 10);
    expect(result.cautions.join(' ')).toMatch(/not a life-safety monitor/);

    const history = readFileSync(at('pass.history.csv'), 'utf8').split('\n');
    const sha = readJsonAs<Calibration>(calibration).sha256;
    expect(history[0]).toBe(
      `# bandwright check history; format 1; calibration sha256 ${sha}; file pass.json`,
    );
    expect(history[1]).toMatch(/^time,recorded_at,gas,unit,certified,measured/);
    const cells = (history[2] as string).split(',');
    expect(cells[0]).toBe('2026-09-01T09:30:00.000Z');
    expect(cells[12]).toBe('pass');
    expect(cells[16]).toBe(at('check-100.4.csv'));
    expect(cells[17]).toBe(
      createHash('sha256')
        .update(readFileSync(at('check-100.4.csv')))
        .digest('hex'),
    );
    expect(history[3]).toBe('');
    expect(result.history).toMatchObject({ file: at('pass.history.csv'), line: 3, created: true, checks: 1 });
  });

  it('prints the σ used and why, the verdict, next due and the caution as text', async () => {
    const calibration = await calibrate('text.json');
    const run = await runCli(
      'recheck',
      calibration,
      at('check-96.5.csv'),
      '--certified',
      '100',
      '--at',
      '2026-09-01T09:30Z',
    );
    expect(run.status).toBe(3);
    expect(run.stdout).toMatch(/Recheck of CO with .*text\.json/);
    expect(run.stdout).toMatch(
      /σ\s+σ = tolerance\/3 = 5 %\/3 = 1\.667 %: 0 of the 8 baseline checks within tolerance exist so far/,
    );
    expect(run.stdout).toMatch(/rules fired\s+1-2s \(warning\)/);
    expect(run.stdout).toMatch(/1-2s: the check of 2026-09-01 is at −2\.\d\dσ, beyond −2σ/);
    expect(run.stdout).toMatch(
      /verdict\s+WARNING: recovery 96\.\d\d % is within the tolerance; warning rule 1-2s fired/,
    );
    expect(run.stdout).toMatch(/next due\s+2026-09-08 09:30Z/);
    expect(run.stdout).toMatch(/Caution:/);
  });

  it('fails outside the tolerance (exit 4), with no next due date', async () => {
    const calibration = await calibrate('fail.json');
    const run = await runCli(
      'recheck',
      calibration,
      at('check-93.csv'),
      '--certified',
      '100',
      '--at',
      '2026-09-01T09:30Z',
      '--json',
    );
    expect(run.status).toBe(4);
    const result = recheckJson(run);
    expect(result.verdict).toBe('fail');
    expect(result.rules.map((r) => r.rule)).toEqual(['1-2s', '1-3s']);
    expect(result.reasons[0]).toMatch(/recovery 93\.\d\d % is outside the tolerance 95\.00–105\.00 %/);
    expect(result.nextDue).toBeNull();
  });

  it('applies the rules across the history: a second check beyond −2σ fails on 2-2s', async () => {
    const calibration = await calibrate('seq.json');
    const first = await runCli(
      'recheck',
      calibration,
      at('check-96.5.csv'),
      '--certified',
      '100',
      '--at',
      '2026-09-01T09:30Z',
    );
    expect(first.status).toBe(3);
    const second = await runCli(
      'recheck',
      calibration,
      at('check-96.5.csv'),
      '--certified',
      '100',
      '--at',
      '2026-09-08T09:30Z',
      '--json',
    );
    expect(second.status).toBe(4);
    const result = recheckJson(second);
    expect(result.rules.map((r) => r.rule)).toEqual(['1-2s', '2-2s']);
    expect(result.reasons[0]).toMatch(
      /within the tolerance, but the check is out of statistical control: 2-2s fired/,
    );
    expect(result.history).toMatchObject({ line: 4, created: false, checks: 2 });
  });

  it('takes the interval and tolerance from the command when given', async () => {
    const calibration = await calibrate('policy.json');
    const run = await runCli(
      'recheck',
      calibration,
      at('check-96.5.csv'),
      '--certified',
      '100',
      '--at',
      '2026-09-01T09:30Z',
      '--tolerance-pct',
      '3',
      '--every-days',
      '1',
      '--json',
    );
    const result = recheckJson(run);
    expect(result.tolerancePct).toBe(3);
    expect(result.verdict).toBe('fail');
    expect(run.status).toBe(4);
    const relaxed = recheckJson(
      await runCli(
        'recheck',
        calibration,
        at('check-100.csv'),
        '--certified',
        '100',
        '--at',
        '2026-09-02T09:30Z',
        '--every-days',
        '1',
        '--json',
      ),
    );
    expect(relaxed.nextDue).toBe('2026-09-03T09:30:00.000Z');
  });

  it('converts a certified value given in another unit (--unit ppb)', async () => {
    const calibration = await calibrate('unit.json');
    const result = recheckJson(
      await runCli(
        'recheck',
        calibration,
        at('check-99.6.csv'),
        '--certified',
        '100000',
        '--unit',
        'ppb',
        '--at',
        '2026-09-01T09:30Z',
        '--json',
      ),
    );
    expect(result.certified).toBeCloseTo(100, 10);
    expect(result.unit).toBe('ppm');
    expect(Math.abs(result.recoveryPct! - 99.6)).toBeLessThan(0.3);
  });

  it('judges a zero-gas check against the detection limit instead of a percentage', async () => {
    const calibration = await calibrate('zero.json');
    const run = await runCli(
      'recheck',
      calibration,
      at('check-0.csv'),
      '--certified',
      '0',
      '--at',
      '2026-09-01T09:30Z',
      '--json',
    );
    expect(run.status).toBe(0);
    const result = recheckJson(run);
    expect(result.kind).toBe('zero');
    expect(result.recoveryPct).toBeNull();
    expect(result.verdict).toBe('pass');
    expect(result.detectionLimit).toBeGreaterThan(0);
    expect(result.reasons[0]).toMatch(/^zero gas: \|measured\| = \d+\.\d+ ppm is below the detection limit/);
    // The same zero-gas scan against a detection limit it exceeds: a 100 ppm scan certified as zero.
    const shifted = await runCli(
      'recheck',
      calibration,
      at('check-100.csv'),
      '--certified',
      '0',
      '--at',
      '2026-09-02T09:30Z',
      '--json',
    );
    expect(shifted.status).toBe(4);
    expect(recheckJson(shifted).reasons[0]).toMatch(
      /is not below the detection limit .*: the zero has shifted/,
    );
  });

  it('takes conditions from options for a scan that does not state them', async () => {
    const calibration = await calibrate('bare.json');
    const run = await runCli(
      'recheck',
      calibration,
      at('bare.csv'),
      '--certified',
      '100',
      '--at',
      '2026-09-01T09:30Z',
      '--path-length',
      '1',
      '--temperature',
      '296.15',
      '--pressure',
      '101.325',
      '--json',
    );
    expect(run.status, run.stderr).toBe(0);
    expect(Math.abs(recheckJson(run).recoveryPct! - 100)).toBeLessThan(0.3);
  });
});

describe('recheck refuses bad input, writing nothing', () => {
  let calibration: string;
  let history: string;
  beforeAll(async () => {
    calibration = await calibrate('guarded.json');
    const first = await runCli(
      'recheck',
      calibration,
      at('check-100.csv'),
      '--certified',
      '100',
      '--at',
      '2026-09-01T09:30Z',
    );
    expect(first.status).toBe(0);
    history = at('guarded.history.csv');
  });

  async function expectFailure(args: string[], message: RegExp, status = 1): Promise<void> {
    const before = folder.files();
    const content = readFileSync(history, 'utf8');
    const run = await runCli(...args);
    expect(run.stderr).toMatch(message);
    expect(run.status).toBe(status);
    expect(folder.files()).toEqual(before);
    expect(readFileSync(history, 'utf8')).toBe(content);
  }

  const base = (): string[] => ['recheck', calibration, at('check-100.csv')];
  it.each([
    ['no --certified', () => base(), /required option '--certified <value>' not specified/, 2],
    [
      'a negative certified value',
      () => [...base(), '--certified', '-5'],
      /--certified = -5, must be a concentration >= 0 \(0 for zero gas\)/,
      2,
    ],
    [
      'a certified value that is not a number',
      () => [...base(), '--certified', 'ten'],
      /--certified = "ten", must be a number/,
      2,
    ],
    [
      'an --at without a time zone',
      () => [...base(), '--certified', '100', '--at', '2026-09-08T09:30'],
      /--at = "2026-09-08T09:30" has no time zone; add Z \(UTC\) or an offset such as \+02:00/,
      2,
    ],
    [
      'an --at that is not a date',
      () => [...base(), '--certified', '100', '--at', 'last tuesday'],
      /--at = "last tuesday", must be an ISO 8601 date or time/,
      2,
    ],
    [
      'an --at on a day that does not exist',
      () => [...base(), '--certified', '100', '--at', '2026-02-30'],
      /--at = "2026-02-30" is not a calendar date/,
      2,
    ],
    [
      'an --at in the future',
      () => [...base(), '--certified', '100', '--at', '2999-01-01T00:00Z'],
      /--at = 2999-01-01T00:00Z is in the future/,
      2,
    ],
    [
      'a tolerance of 0',
      () => [...base(), '--certified', '100', '--tolerance-pct', '0'],
      /--tolerance-pct = 0, must be a percentage > 0 and < 100/,
      2,
    ],
    ['an unknown unit', () => [...base(), '--certified', '100', '--unit', 'mg'], /--unit/, 1],
    [
      'standard input as the scan',
      () => ['recheck', calibration, '-', '--certified', '100'],
      /recheck needs the check scan as a file/,
      2,
    ],
    [
      'a missing scan',
      () => ['recheck', calibration, at('nope.csv'), '--certified', '100'],
      /nope\.csv: no such file/,
      1,
    ],
    [
      'a gas the calibration does not have',
      () => [...base(), '--certified', '100', '--gas', 'NO'],
      /--gas = "NO", the calibration has CO/,
      1,
    ],
    [
      'a scan without conditions',
      () => ['recheck', calibration, at('bare.csv'), '--certified', '100'],
      /bare\.csv: no path length/,
      1,
    ],
  ])('%s', async (_name, args, message, status) => {
    await expectFailure(args(), message, status);
  });

  it('refuses a tampered calibration', async () => {
    const content = readJsonAs<Calibration>(calibration);
    content.method.recheck.tolerancePct = 50;
    writeFileSync(at('tampered.json'), JSON.stringify(content));
    await expectFailure(
      ['recheck', at('tampered.json'), at('check-100.csv'), '--certified', '100'],
      /tampered\.json: content does not match its recorded sha256/,
    );
    expect(existsSync(at('tampered.history.csv'))).toBe(false);
  });

  it('refuses to append after a torn last line, showing the line and how to repair it', async () => {
    const torn = `${readFileSync(history, 'utf8')}2026-09-08T09:30:00.000Z,2026-09-08T09:31:00.000Z,CO,ppm,100,99.`;
    writeFileSync(history, torn);
    await expectFailure(
      [...base(), '--certified', '100', '--at', '2026-09-15T09:30Z'],
      /guarded\.history\.csv line 4: the last line is incomplete \(no end of line\), a record torn when a recheck was interrupted: "2026-09-08T09:30:00\.000Z,2026-09-08T09:31:00\.000Z,CO,ppm,100,99\.". Nothing is appended until it is repaired: .* delete that line/,
    );
    writeFileSync(history, torn.slice(0, torn.lastIndexOf('\n') + 1));
  });

  it('refuses a history that belongs to another calibration (rebuilt with --force)', async () => {
    const rebuilt = await runCli(
      'calibrate',
      at('standards.csv'),
      ...bandArgs,
      '--model',
      'origin',
      '-o',
      at('guarded.json'),
      '--force',
    );
    expect(rebuilt.status).toBe(0);
    await expectFailure(
      [...base(), '--certified', '100'],
      /guarded\.history\.csv line 1: this history belongs to the calibration with sha256 [0-9a-f]{12}…, but .*guarded\.json has sha256 [0-9a-f]{12}…: the calibration was rebuilt/,
    );
  });
});
