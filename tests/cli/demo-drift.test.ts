/**
 * The demo's recheck steps: the twelve weekly checks of the bundled example (invented scenario,
 * examples/README.md: the response falls 1.3 %/week from week 7) are recorded in order, and the
 * status step reports the calibration failed.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readHistory } from '../../src/store/history.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';

const folder = temporaryFolder('bandwright-demo-drift-');
afterAll(() => folder.cleanup());
const out = join(folder.path, 'demo');

const checkList = readFileSync(new URL('../../examples/lab-co/checks.csv', import.meta.url), 'utf8')
  .trim()
  .split('\n')
  .slice(1);

describe('demo rechecks', () => {
  it('records every check of the example in order and ends with the status table', async () => {
    const run = await runCli('demo', '--out', out);
    expect(run.status, run.stderr).toBe(0);
    const calibration = JSON.parse(readFileSync(join(out, 'lab-co.calibration.json'), 'utf8')) as {
      sha256: string;
    };
    const history = readHistory(join(out, 'lab-co.calibration.history.csv'), {
      calibrationSha256: calibration.sha256,
    });
    expect(history.records).toHaveLength(checkList.length);
    expect(history.records.map((r) => r.time)).toEqual(checkList.map((line) => line.split(',')[2]));
    const verdicts = history.records.map((r) => r.verdict);
    // Weeks 1–6 are on the certified value: they pass; the last checks are well outside ±5 %.
    expect(verdicts.slice(0, 6)).toEqual(Array(6).fill('pass'));
    expect(verdicts.slice(-2)).toEqual(['fail', 'fail']);
    // The drift is caught before the tolerance is crossed: a check within ±5 % already fails on the rules.
    expect(
      history.records.some(
        (r) =>
          r.verdict === 'fail' &&
          Math.abs((r.recoveryPct as number) - 100) <= 5 &&
          r.rules.some((rule) => rule !== '1-2s'),
      ),
    ).toBe(true);
    // One line per recheck in the account, then the status table on stdout.
    expect(
      run.stderr.match(/^ {3}2026-\d\d-\d\d {2}recovery \d+\.\d\d % {2}(pass|warning|fail)/gm),
    ).toHaveLength(checkList.length);
    expect(run.stdout).toMatch(/Recheck status at 2026-11-20 12:00Z/);
    expect(run.stdout).toMatch(
      /lab-co\.calibration\.json\s+CO\s+2026-11-17 09:30Z\s+fail\s+\d+\.\d\d\s+now\s+\d+\.\d\s+FAILED\s+crossed 95 %/,
    );
    expect(readFileSync(join(out, 'status.txt'), 'utf8')).toMatch(/FAILED/);
  }, 120_000);

  it('starts a new history when run again with --force, keeping the old one beside it', async () => {
    const run = await runCli('demo', '--out', out, '--force');
    expect(run.status, run.stderr).toBe(0);
    const names = readdirSync(out);
    expect(names.filter((n) => /^lab-co\.calibration\.history\.replaced-.*\.csv$/.test(n))).toHaveLength(1);
    expect(readHistory(join(out, 'lab-co.calibration.history.csv')).records).toHaveLength(checkList.length);
  }, 120_000);
});
