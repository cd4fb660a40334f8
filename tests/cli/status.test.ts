/**
 * `bandwright status`: table and JSON of calibrations with last check, verdict, next due, days
 * overdue and trend, and the exit statuses a scheduler alerts on.
 *
 * Sources: exit statuses of DESIGN §4 (0 all current, 3 due within a day, 4 overdue or last
 * recheck failed; 1 unreadable input); next due = last passing check + interval (DESIGN §1.4,
 * common practice for check-standard schedules). Histories are made with `recheck --at`.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bandScan, writeScan } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import type { StatusDocument } from '../helpers/documents.js';
import { parseJsonAs, readJsonAs } from '../helpers/json.js';
import type { Calibration } from '../../src/calibration/calibration.js';

const folder = temporaryFolder('bandwright-status-');
const at = (...parts: string[]) => join(folder.path, ...parts);
const reference = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const bandArgs = ['--gas', 'CO', '--band', '2040:2245', '--baseline', '2000:2030,2255:2290'];
const previousEpoch = process.env.SOURCE_DATE_EPOCH;

async function calibration(path: string): Promise<string> {
  const run = await runCli('calibrate', at('standards.csv'), ...bandArgs, '-o', path);
  expect(run.status, run.stderr).toBe(0);
  return path;
}

async function recheck(calibrationPath: string, scan: string, time: string): Promise<number> {
  return (await runCli('recheck', calibrationPath, at(scan), '--certified', '100', '--at', time)).status;
}

beforeAll(async () => {
  // Calibrations stamped 2026-08-30T00:00Z (the reproducible-builds convention calibrate honours).
  process.env.SOURCE_DATE_EPOCH = String(Date.UTC(2026, 7, 30) / 1000);
  const rows = ['scan,CO_ppm'];
  [0, 0, 50, 50, 100, 100, 200, 200, 400, 400].forEach((ppm, i) => {
    writeScan(at(`std-${i}.csv`), bandScan(ppm * (1 + 0.002 * Math.sin(7 * i + 1)), { metadata: reference }));
    rows.push(`std-${i}.csv,${ppm}`);
  });
  writeFileSync(at('standards.csv'), `${rows.join('\n')}\n`);
  writeScan(at('check-100.csv'), bandScan(100.2, { metadata: reference }));
  writeScan(at('check-96.csv'), bandScan(96, { metadata: reference }));
  writeScan(at('check-90.csv'), bandScan(90, { metadata: reference }));
  for (const sub of ['current', 'failed', 'mixed', 'empty', 'never']) mkdirSync(at(sub));
  // current/: a checked on 09-01, b on 09-03 (weekly).
  expect(
    await recheck(
      await calibration(at('current', 'a.calibration.json')),
      'check-100.csv',
      '2026-09-01T09:30Z',
    ),
  ).toBe(0);
  expect(
    await recheck(
      await calibration(at('current', 'b.calibration.json')),
      'check-100.csv',
      '2026-09-03T09:30Z',
    ),
  ).toBe(0);
  writeFileSync(
    at('current', 'method.json'),
    JSON.stringify({ gases: [{ name: 'CO', band: [2040, 2245] }] }),
  );
  // failed/: a pass, then a failed check on 09-08.
  const failing = await calibration(at('failed', 'c.calibration.json'));
  expect(await recheck(failing, 'check-100.csv', '2026-09-01T09:30Z')).toBe(0);
  expect(await recheck(failing, 'check-90.csv', '2026-09-08T09:30Z')).toBe(4);
  // mixed/: one current, one tampered.
  expect(
    await recheck(
      await calibration(at('mixed', 'good.calibration.json')),
      'check-100.csv',
      '2026-09-03T09:30Z',
    ),
  ).toBe(0);
  const tampered = readJsonAs<Calibration>(at('mixed', 'good.calibration.json'));
  tampered.title = 'edited by hand';
  writeFileSync(at('mixed', 'edited.calibration.json'), JSON.stringify(tampered));
  // never/: no check yet.
  await calibration(at('never', 'n.calibration.json'));
});
afterAll(() => {
  if (previousEpoch === undefined) delete process.env.SOURCE_DATE_EPOCH;
  else process.env.SOURCE_DATE_EPOCH = previousEpoch;
  folder.cleanup();
});

describe('exit statuses for cron and CI (DESIGN §4)', () => {
  it('0 when every calibration is current', async () => {
    const run = await runCli('status', at('current'), '--now', '2026-09-05T12:00Z');
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toMatch(
      /a\.calibration\.json\s+CO\s+2026-09-01 09:30Z\s+pass\s+100\.\d\d\s+2026-09-08 09:30Z\s+OK/,
    );
    expect(run.stdout).toMatch(/b\.calibration\.json\s+CO\s+2026-09-03 09:30Z\s+pass/);
  });

  it('3 when one is due within a day', async () => {
    const run = await runCli('status', at('current'), '--now', '2026-09-07T12:00Z');
    expect(run.status).toBe(3);
    expect(run.stdout).toMatch(/a\.calibration\.json\s+CO.*\s+DUE\s/);
    expect(run.stdout).toMatch(/b\.calibration\.json\s+CO.*\s+OK\s/);
    expect(run.stdout).toMatch(/due within 1 day: 7 days after the latest check \(2026-09-01, pass\)/);
  });

  it('4 when one is overdue, with the days overdue', async () => {
    const run = await runCli('status', at('current'), '--now', '2026-09-09T21:30Z');
    expect(run.status).toBe(4);
    expect(run.stdout).toMatch(
      /a\.calibration\.json\s+CO\s+2026-09-01 09:30Z\s+pass\s+100\.\d\d\s+2026-09-08 09:30Z\s+1\.5\s+OVERDUE/,
    );
    expect(run.stdout).toMatch(/b\.calibration\.json\s+CO.*\s+DUE\s/);
  });

  it('4 when the last recheck failed, even if it is recent', async () => {
    const run = await runCli('status', at('failed'), '--now', '2026-09-08T10:00Z');
    expect(run.status).toBe(4);
    expect(run.stdout).toMatch(
      /c\.calibration\.json\s+CO\s+2026-09-08 09:30Z\s+fail\s+90\.\d\d\s+now\s+0\.0\s+FAILED/,
    );
    expect(run.stdout).toMatch(
      /the latest check \(2026-09-08\) failed: find the cause, then recheck, or rebuild the calibration/,
    );
  });

  it('counts from the calibration when it was never checked', async () => {
    expect((await runCli('status', at('never'), '--now', '2026-09-01T00:00Z')).status).toBe(0);
    const late = await runCli('status', at('never'), '--now', '2026-09-07T00:00Z');
    expect(late.status).toBe(4);
    expect(late.stdout).toMatch(
      /n\.calibration\.json\s+CO\s+—\s+never checked\s+2026-09-06 00:00Z\s+1\.0\s+OVERDUE/,
    );
  });

  it('1 when a calibration cannot be read, alongside the others (4 wins when one is overdue)', async () => {
    const run = await runCli('status', at('mixed'), '--now', '2026-09-05T00:00Z');
    expect(run.status).toBe(1);
    expect(run.stdout).toMatch(/good\.calibration\.json\s+CO.*OK/);
    expect(run.stdout).toMatch(
      /Errors:\n\s+.*edited\.calibration\.json: .*content does not match its recorded sha256/,
    );
    expect(run.stderr).toMatch(/edited\.calibration\.json: content does not match its recorded sha256/);
    expect((await runCli('status', at('mixed'), '--now', '2026-09-20T00:00Z')).status).toBe(4);
  });
});

describe('targets, options and output', () => {
  it('skips JSON that is not a calibration, with a note, and takes calibration files directly', async () => {
    const run = await runCli('status', at('current'), '--now', '2026-09-05T12:00Z');
    expect(run.stdout).toMatch(/Skipped:\n\s+.*method\.json: not a calibration \(no schemaVersion\)/);
    const direct = await runCli(
      'status',
      at('current', 'b.calibration.json'),
      at('failed', 'c.calibration.json'),
      '--now',
      '2026-09-05T12:00Z',
    );
    expect(direct.status).toBe(4);
    expect(direct.stdout).not.toMatch(/a\.calibration\.json/);
  });

  it('reports a folder with no calibration, and a missing file, as bad input (exit 1)', async () => {
    const empty = await runCli('status', at('empty'), '--now', '2026-09-05T12:00Z');
    expect(empty.status).toBe(1);
    expect(empty.stderr).toMatch(/empty: no calibration files in this folder/);
    const missing = await runCli('status', at('nope.calibration.json'));
    expect(missing.status).toBe(1);
    expect(missing.stderr).toMatch(/nope\.calibration\.json: no such file/);
  });

  it('looks in ./calibrations when given nothing (the bundled calibrations, never checked)', async () => {
    const lab = readJsonAs<Calibration>('calibrations/lab-co.calibration.json');
    const stack = readJsonAs<Calibration>('calibrations/stack-k2.calibration.json');
    const soon = new Date(Date.parse(lab.createdAt) + 86_400_000).toISOString();
    const run = await runCli('status', '--now', soon);
    expect(run.stdout).toMatch(/calibrations\/lab-co\.calibration\.json\s+CO\s+—\s+never checked/);
    expect(run.stdout).toMatch(/calibrations\/stack-k2\.calibration\.json\s+CO\s+—\s+never checked/);
    expect(run.stdout).toMatch(/calibrations\/stack-k2\.calibration\.json\s+N2O\s+—\s+never checked/);
    // A day after the build, a calibration is due within a day when its interval is two days or less.
    const dueSoon = [lab, stack].some(
      (c) => c.method.recheck.everyDays <= 2 && c.createdAt === lab.createdAt,
    );
    expect(run.status).toBe(dueSoon ? 3 : 0);
  });

  it('applies --every-days and --tolerance-pct to every calibration, noting verdicts that change', async () => {
    const run = await runCli(
      'status',
      at('current'),
      '--now',
      '2026-09-05T12:00Z',
      '--every-days',
      '3',
      '--json',
    );
    expect(run.status).toBe(4);
    const document = parseJsonAs<StatusDocument>(run.stdout);
    expect(document.calibrations.map((c) => c.nextDue)).toEqual([
      '2026-09-04T09:30:00.000Z',
      '2026-09-06T09:30:00.000Z',
    ]);
    const strict = parseJsonAs<StatusDocument>(
      (
        await runCli(
          'status',
          at('current'),
          '--now',
          '2026-09-05T12:00Z',
          '--tolerance-pct',
          '0.1',
          '--json',
        )
      ).stdout,
    );
    expect(strict.calibrations[0]?.lastCheck?.verdict).toBe('fail');
    expect(strict.calibrations[0]?.notes[0]).toMatch(
      /was recorded as pass \(tolerance ±5 %\) and is judged fail now \(tolerance ±0\.1 %\)/,
    );
  });

  it('gives JSON for schedulers with the state, next due, days overdue and trend of each gas', async () => {
    const run = await runCli('status', at('current'), at('failed'), '--now', '2026-09-09T21:30Z', '--json');
    expect(run.status).toBe(4);
    const document = parseJsonAs<StatusDocument>(run.stdout);
    expect(document.now).toBe('2026-09-09T21:30:00.000Z');
    expect(document.exitStatus).toBe(4);
    expect(document.calibrations).toHaveLength(3);
    const [a, b, c] = document.calibrations;
    expect(a).toMatchObject({
      gas: 'CO',
      unit: 'ppm',
      everyDays: 7,
      tolerancePct: 5,
      checks: 1,
      state: 'overdue',
      nextDue: '2026-09-08T09:30:00.000Z',
    });
    expect(a?.daysOverdue).toBeCloseTo(1.5, 10);
    expect(a?.lastCheck).toMatchObject({
      time: '2026-09-01T09:30:00.000Z',
      verdict: 'pass',
      certified: 100,
      line: 3,
    });
    expect(a?.trend.status).toBe('insufficient');
    expect(b?.state).toBe('due');
    expect(c).toMatchObject({ state: 'failed', nextDue: null, checks: 2 });
    expect(document.skipped).toEqual([
      { file: at('current', 'method.json'), message: 'not a calibration (no schemaVersion)' },
    ]);
  });

  it('refuses a --now without a time zone as a usage error', async () => {
    const run = await runCli('status', at('current'), '--now', '2026-09-05 12:00');
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(/--now = "2026-09-05 12:00", must be an ISO 8601 date or time/);
  });
});
