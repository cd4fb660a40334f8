/**
 * `quantify` outputs through the one engine: with --report or --plot the result files, the table
 * and the --json document are the same as without them; --quiet holds with --report too; results
 * of --response go to --csv and --jsonl as a scan's would, and an existing file is refused before
 * anything is written.
 *
 * Known truth: Gaussian bands of analytic area proportional to the concentration
 * (tests/helpers/band-scans.ts; Beer–Lambert for gases, DESIGN §3).
 */
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BAND_OPTIONS, bandScan, writeScan, writeStandardSeries } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';

const folder = temporaryFolder('bandwright-quantify-outputs-');
const at = (name: string) => join(folder.path, name);
const reference = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const scans = ['a.csv', 'b.jdx', 'bad.csv', 'c.csv'].map(at);

beforeAll(async () => {
  writeStandardSeries(at, reference);
  const calibrated = await runCli('calibrate', at('standards.csv'), ...BAND_OPTIONS, '-o', at('co.json'));
  expect(calibrated.status, calibrated.stderr).toBe(0);
  writeScan(at('a.csv'), bandScan(60, { metadata: reference }));
  writeScan(at('b.jdx'), bandScan(120, { metadata: reference }));
  writeFileSync(at('bad.csv'), 'not a scan\n');
  writeScan(at('c.csv'), bandScan(240, { metadata: reference }));
});
afterAll(() => folder.cleanup());

describe('quantify --report and --plot go through the streaming engine', () => {
  it('write the same CSV, JSON lines and table as a run without them', async () => {
    const plain = await runCli(
      'quantify',
      at('co.json'),
      ...scans,
      '--csv',
      at('plain.csv'),
      '--jsonl',
      at('plain.jsonl'),
    );
    const reported = await runCli(
      'quantify',
      at('co.json'),
      ...scans,
      '--csv',
      at('reported.csv'),
      '--jsonl',
      at('reported.jsonl'),
      '--report',
      at('reported.html'),
      '--plot',
      at('plots'),
      '--workers',
      '2',
    );
    expect(plain.status).toBe(1);
    expect(reported.status).toBe(1);
    expect(readFileSync(at('reported.csv'), 'utf8')).toBe(readFileSync(at('plain.csv'), 'utf8'));
    expect(readFileSync(at('reported.jsonl'), 'utf8')).toBe(readFileSync(at('plain.jsonl'), 'utf8'));
    expect(reported.stdout).toBe(plain.stdout);
    expect(reported.stderr).toContain(`report written to ${at('reported.html')}`);
    expect(reported.stderr).toMatch(/bad\.csv line 1/);
    // Spectra are kept for the report, so the scans are quantified in this thread.
    expect(reported.stderr).toMatch(/4 scan\(s\), 1 failed, in [\d.]+ s \(\d+ scans\/s\)\n/);
    expect(readdirSync(at('plots')).sort()).toEqual([
      'a-CO-spectrum.svg',
      'b-CO-spectrum.svg',
      'c-CO-spectrum.svg',
    ]);
    const json = await runCli('quantify', at('co.json'), ...scans, '--json');
    const jsonReported = await runCli(
      'quantify',
      at('co.json'),
      ...scans,
      '--json',
      '--report',
      at('json.html'),
    );
    expect(jsonReported.stdout).toBe(json.stdout);
  });

  it('print nothing on stdout with --quiet', async () => {
    const run = await runCli('quantify', at('co.json'), at('a.csv'), '--report', at('quiet.html'), '--quiet');
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toBe('');
    expect(existsSync(at('quiet.html'))).toBe(true);
  });
});

describe('quantify --response', () => {
  it('writes the result to --csv and --jsonl as a scan result is written', async () => {
    const run = await runCli(
      'quantify',
      at('co.json'),
      '--response',
      '2.0',
      '--response',
      '2.02',
      '--csv',
      at('response.csv'),
      '--jsonl',
      at('response.jsonl'),
    );
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toMatch(/mean of 2 responses\s+CO/);
    const csv = readFileSync(at('response.csv'), 'utf8').split('\n');
    expect(csv[0]).toBe('scan,CO_ppm,CO_low,CO_high,CO_flags,residual_rms,calibration_sha256,error,warnings');
    expect(Number(csv[1]?.split(',')[1])).toBeCloseTo(100.5, 0);
    const line = JSON.parse(readFileSync(at('response.jsonl'), 'utf8')) as { scan: string };
    expect(line.scan).toBe('mean of 2 responses');
    expect(run.stderr).toContain(`results written to ${at('response.csv')}`);
  });

  it('refuses an existing --csv without --force, before writing any output', async () => {
    writeFileSync(at('taken.csv'), 'earlier\n');
    const run = await runCli(
      'quantify',
      at('co.json'),
      '--response',
      '2.0',
      '--jsonl',
      at('never.jsonl'),
      '--csv',
      at('taken.csv'),
    );
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(/taken\.csv exists; use --force to replace it/);
    expect(run.stdout).toBe('');
    expect(readFileSync(at('taken.csv'), 'utf8')).toBe('earlier\n');
    expect(existsSync(at('never.jsonl'))).toBe(false);
    expect(readdirSync(folder.path).filter((name) => name.includes('.partial-'))).toEqual([]);
  });
});
