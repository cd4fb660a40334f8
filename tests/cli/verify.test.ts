/**
 * `bandwright verify`: the calibration's own hash, then every input it lists re-hashed
 * (unchanged / changed / missing), exit status 0 only when all are unchanged; and every
 * quantify result carries the calibration's hash. SHA-256 values are checked against
 * node:crypto's FIPS 180-4 implementation (the same digest `sha256sum` prints).
 */
import { createHash } from 'node:crypto';
import { appendFileSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { verifyInputs, type IntegrityReport } from '../../src/store/verify.js';
import type { Calibration } from '../../src/calibration/calibration.js';
import { bandScan, writeScan } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import type { QuantifyDocument, ResultLine } from '../helpers/documents.js';
import { parseJsonAs, parseJsonLinesAs, readJsonAs } from '../helpers/json.js';

const folder = temporaryFolder();
const at = (name: string): string => join(folder.path, name);
const conditions = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const bandArgs = ['--gas', 'CO', '--band', '2040:2245', '--baseline', '2000:2030,2255:2290'];
const levels = [0, 50, 100, 200, 400];

beforeAll(async () => {
  levels.forEach((ppm) => writeScan(at(`s${ppm}.csv`), bandScan(ppm, { metadata: conditions, step: 2 })));
  writeFileSync(
    at('standards.csv'),
    `scan,CO_ppm\n${levels.map((ppm) => `s${ppm}.csv,${ppm}`).join('\n')}\n`,
  );
  const run = await runCli('calibrate', at('standards.csv'), ...bandArgs, '-o', at('cal/co.json'));
  expect(run.status, run.stderr).toBe(0);
});
afterAll(() => folder.cleanup());

const sha256 = (path: string): string => createHash('sha256').update(readFileSync(path)).digest('hex');

describe('verify', () => {
  it('finds every input unchanged right after calibrate: status 0, paths relative to the calibration folder', async () => {
    const report = verifyInputs(at('cal/co.json'));
    expect(report.ok).toBe(true);
    expect(report.inputs.map((i) => [i.role, i.path, i.status])).toEqual([
      ['manifest', '../standards.csv', 'unchanged'],
      ...levels.map((ppm) => ['standard', `../s${ppm}.csv`, 'unchanged']),
    ]);
    expect(report.inputs[1]?.sha256).toBe(sha256(at('s0.csv')));
    const run = await runCli('verify', at('cal/co.json'));
    expect(run.status).toBe(0);
    expect(run.stdout).toMatch(/content matches its sha256 [0-9a-f]{64}/);
    expect(run.stderr).toMatch(/all 6 input file\(s\) unchanged/);
  });

  it('names a changed and a missing input, with the hashes, and exits 1', async () => {
    const original = readFileSync(at('s100.csv'));
    appendFileSync(at('s100.csv'), '# edited\n');
    const moved = readFileSync(at('s400.csv'));
    rmSync(at('s400.csv'));
    try {
      const run = await runCli('verify', at('cal/co.json'), '--json');
      expect(run.status).toBe(1);
      const report = parseJsonAs<IntegrityReport>(run.stdout);
      const states = Object.fromEntries(report.inputs.map((i) => [i.path, i.status]));
      expect(states).toMatchObject({
        '../s100.csv': 'changed',
        '../s400.csv': 'missing',
        '../s0.csv': 'unchanged',
      });
      expect(report.inputs.find((i) => i.path === '../s100.csv')?.currentSha256).toBe(sha256(at('s100.csv')));
      expect(run.stderr).toMatch(
        /2 of 6 input file\(s\) of .*co.json changed or missing since it was built: \.\.\/s100.csv \(changed\), \.\.\/s400.csv \(missing\)/,
      );
      const text = await runCli('verify', at('cal/co.json'));
      expect(text.stdout).toMatch(
        /standard\s+\.\.\/s100\.csv\s+CHANGED\s+recorded [0-9a-f]{12}…, now [0-9a-f]{12}…/,
      );
      expect(text.stdout).toMatch(/standard\s+\.\.\/s400\.csv\s+MISSING/);
    } finally {
      writeFileSync(at('s100.csv'), original);
      writeFileSync(at('s400.csv'), moved);
    }
    expect((await runCli('verify', at('cal/co.json'))).status).toBe(0);
  });

  it('refuses a calibration whose own content does not match its hash (INTEGRITY), before looking at inputs', async () => {
    const calibration = readJsonAs<Calibration>(at('cal/co.json'));
    calibration.gases[0]!.model.coefficients.b *= 1.01;
    writeFileSync(at('cal/tampered.json'), JSON.stringify(calibration, null, 2));
    const run = await runCli('verify', at('cal/tampered.json'));
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(/tampered.json: content does not match its recorded sha256/);
    expect(run.stdout).toBe('');
  });
});

describe('results carry the calibration hash', () => {
  it('quantify --json gives it once for the document, --csv and --jsonl on every row, failed scans included', async () => {
    const recorded = readJsonAs<Calibration>(at('cal/co.json')).sha256;
    const json = await runCli('quantify', at('cal/co.json'), at('s50.csv'), at('s200.csv'), '--json');
    expect(json.status).toBe(0);
    expect(parseJsonAs<QuantifyDocument>(json.stdout).calibration.sha256).toBe(recorded);
    writeFileSync(at('broken.csv'), 'wavenumber_cm-1,absorbance\n2000,0.1\n2001,abc\n');
    const csv = await runCli(
      'quantify',
      at('cal/co.json'),
      at('s50.csv'),
      at('broken.csv'),
      '--csv',
      at('r.csv'),
    );
    expect(csv.status).toBe(1);
    const [header, ...rows] = readFileSync(at('r.csv'), 'utf8').trimEnd().split('\n');
    const column = (header ?? '').split(',').indexOf('calibration_sha256');
    expect(column).toBeGreaterThan(0);
    expect(rows).toHaveLength(2);
    for (const row of rows) expect(row.split(',')[column]).toBe(recorded);
    const jsonl = await runCli(
      'quantify',
      at('cal/co.json'),
      at('s50.csv'),
      at('broken.csv'),
      '--jsonl',
      at('r.jsonl'),
    );
    expect(jsonl.status).toBe(1);
    const lines = parseJsonLinesAs<ResultLine>(readFileSync(at('r.jsonl'), 'utf8'));
    expect(lines).toHaveLength(2);
    for (const line of lines) expect(line.calibrationSha256).toBe(recorded);
  });
});
