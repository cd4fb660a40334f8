/**
 * `recheck` and `status` at the edges of the drift statistics, end to end: the same check scan
 * rechecked on twenty successive days (every recheck passes; σ is the check's own standard error,
 * never a collapsed baseline SD), the CUSUM chart in the text and JSON, and a check recorded late
 * for an earlier time whose effect on a later check's verdict is reported once.
 *
 * Known truth: the scans hold a Gaussian band whose area is analytic (tests/helpers/band-scans.ts),
 * so a 96.5 ppm scan against a certified 100 ppm has a recovery of 96.5 % (common practice);
 * 2-2s as in Westgard et al., Clinical Chemistry 27 (1981) 493; tabular CUSUM with k = 0.5σ,
 * h = 5σ (ISO 7870-4, common practice, from memory).
 */
import { copyFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BAND_OPTIONS, bandScan, writeScan, writeStandardSeries } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import type { RecheckDocument, StatusDocument } from '../helpers/documents.js';
import { parseJsonAs } from '../helpers/json.js';

const folder = temporaryFolder('bandwright-recheck-drift-');
const at = (name: string) => join(folder.path, name);
const reference = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };

async function calibrate(name: string): Promise<string> {
  const run = await runCli('calibrate', at('standards.csv'), ...BAND_OPTIONS, '-o', at(name));
  expect(run.status, run.stderr).toBe(0);
  return at(name);
}

function recheck(calibration: string, scan: string, time: string, ...more: string[]) {
  return runCli('recheck', calibration, at(scan), '--certified', '100', '--at', time, ...more);
}

beforeAll(() => {
  writeStandardSeries(at, reference);
  for (const ppm of [96.5, 100]) writeScan(at(`check-${ppm}.csv`), bandScan(ppm, { metadata: reference }));
});
afterAll(() => folder.cleanup());

describe('the same check scan rechecked on twenty successive days', () => {
  it('passes every time, with σ from the check and no σ multiple it cannot support', async () => {
    // The bundled example's calibration and its first weekly check scan (recovery 100.74 %, standard
    // error 1.19 %), the case that used to fail from the ninth recheck on.
    const calibration = at('lab-co.calibration.json');
    copyFileSync(new URL('../../calibrations/lab-co.calibration.json', import.meta.url), calibration);
    const scan = fileURLToPath(new URL('../../examples/lab-co/checks/check-2026-09-01.jdx', import.meta.url));
    const statuses: number[] = [];
    let last = '';
    for (let day = 1; day <= 20; day++) {
      const time = `2026-09-${String(day).padStart(2, '0')}T09:30Z`;
      const run = await runCli('recheck', calibration, scan, '--certified', '100', '--at', time);
      statuses.push(run.status);
      expect(run.stdout).not.toMatch(/\de[+-]?\d+σ/);
      last = run.stdout;
    }
    expect(statuses).toEqual(new Array<number>(20).fill(0));
    expect(last).toMatch(/verdict\s+PASS: recovery 100\.7\d % is within the tolerance/);
    // The baseline SD of twenty identical results is 0: it is not what sets σ.
    expect(last).toMatch(/σ\s+σ = 1\.1\d\d %, this check's own standard error of prediction/);
    expect(last).toMatch(/the SD of the 8 baseline checks \(2026-09-01 to 2026-09-08\), 0\.000 %/);
    expect(last).toMatch(/CUSUM\s+C⁺ = \d\.\d\dσ, C⁻ = 0\.00σ \(k = 0\.5σ, h = 5σ\): no signal/);
    const status = await runCli('status', calibration, '--now', '2026-09-21T00:00Z');
    expect(status.status).toBe(0);
    expect(status.stdout).toMatch(/OK\s+no significant drift; CUSUM \d\.\d\/5σ/);
  }, 120_000);
});

describe('the CUSUM chart and verdict changes in the JSON', () => {
  it('gives cusum {k, h, upper, lower, signal, onSignal, since} and changedVerdicts', async () => {
    const calibration = await calibrate('json.json');
    const run = await recheck(calibration, 'check-100.csv', '2026-09-01T09:30Z', '--json');
    expect(run.status, run.stderr).toBe(0);
    const result = parseJsonAs<RecheckDocument>(run.stdout);
    expect(result.cusum).toEqual({
      k: 0.5,
      h: 5,
      upper: expect.any(Number) as number,
      lower: expect.any(Number) as number,
      signal: null,
      onSignal: 'warning',
      since: null,
    });
    expect(result.changedVerdicts).toEqual([]);
    expect(result.sigma).toMatchObject({ basis: 'floor', shortHistory: true, floorPct: 5 / 3 });
    const status = parseJsonAs<StatusDocument>(
      (await runCli('status', calibration, '--now', '2026-09-02T00:00Z', '--json')).stdout,
    );
    expect(status.calibrations[0]?.cusum).toMatchObject({ k: 0.5, h: 5, signal: null, onSignal: 'warning' });
    expect(status.calibrations[0]?.cusum.summary).toMatch(/^CUSUM \(k = 0\.5σ, h = 5σ\): C⁺ = /);
  });
});

describe('a check recorded late for an earlier time', () => {
  it('is judged in time order, and the verdict it changes is reported once', async () => {
    const calibration = await calibrate('late.json');
    expect((await recheck(calibration, 'check-100.csv', '2026-09-01T09:30Z')).status).toBe(0);
    expect((await recheck(calibration, 'check-100.csv', '2026-09-08T09:30Z')).status).toBe(0);
    // 96.5 % is at −2.1σ (σ = tolerance/3): 1-2s alone, a warning.
    expect((await recheck(calibration, 'check-96.5.csv', '2026-09-22T09:30Z')).status).toBe(3);
    // The check of 09-15 comes in late: itself a warning (only 09-08 precedes it) ...
    const late = await recheck(calibration, 'check-96.5.csv', '2026-09-15T09:30Z', '--json');
    expect(late.status).toBe(3);
    const result = parseJsonAs<RecheckDocument>(late.stdout);
    expect(result.rules.map((r) => r.rule)).toEqual(['1-2s']);
    // ... and it makes 09-22 a 2-2s fail.
    expect(result.changedVerdicts).toEqual([
      {
        time: '2026-09-22T09:30:00.000Z',
        line: 5,
        from: 'warning',
        to: 'fail',
        note:
          'this check is recorded for 2026-09-15, before the check of 2026-09-22 (history line 5), which is ' +
          'judged again in time order with it: its verdict changes from warning to fail (1-2s, 2-2s)',
      },
    ]);
    expect(result.notes).toEqual([result.changedVerdicts[0]?.note]);
    // The next recheck does not report it again; it only counts it.
    const next = await recheck(calibration, 'check-100.csv', '2026-09-29T09:30Z');
    expect(next.stdout).not.toMatch(/its verdict changes/);
    expect(next.stdout).toMatch(/1 earlier check is judged differently now than when recorded/);
    // The status names it, with the cause, once.
    const status = await runCli('status', calibration, '--now', '2026-09-30T00:00Z');
    const mentions = status.stdout.match(
      /the check of 2026-09-22 \(history line 5\) was recorded as warning/g,
    );
    expect(mentions).toHaveLength(1);
    expect(status.stdout).toMatch(
      /was recorded as warning and is judged fail now: the check of 2026-09-15 \(history line 6\), recorded on \d{4}-\d\d-\d\d for an earlier time, now comes before it/,
    );
  });
});
