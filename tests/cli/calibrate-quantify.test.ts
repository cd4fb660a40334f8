/**
 * End to end: standards (CSV and JCAMP-DX) → calibrate → quantify, in all three output forms.
 *
 * Known truth: each scan holds a Gaussian band whose area is analytic (h·s·√(2π)), proportional
 * to concentration × φ with φ = (L/L_ref)(P/P_ref)(T_ref/T) (Beer–Lambert for gases, DESIGN §3).
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bandScan, writeScan } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import { gasAt, scanResult, type QuantifyDocument } from '../helpers/documents.js';
import { parseJsonAs, readJsonAs } from '../helpers/json.js';
import type { Calibration } from '../../src/calibration/calibration.js';

const folder = temporaryFolder();
const at = (name: string) => join(folder.path, name);
const reference = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const bandArgs = ['--gas', 'CO', '--band', '2040:2245', '--baseline', '2000:2030,2255:2290'];

beforeAll(() => {
  const levels = [0, 0, 50, 50, 100, 100, 200, 200, 400, 400];
  const rows = ['scan,CO_ppm,path_length_m,temperature_K,pressure_kPa,uncertainty_pct,lot'];
  levels.forEach((ppm, i) => {
    // A little scatter (±0.2 %) so the residual SD is not zero; alternating formats.
    const wobble = 1 + 0.002 * Math.sin(7 * i + 1);
    const name = `std-${i}.${i % 2 === 0 ? 'csv' : 'jdx'}`;
    writeScan(at(name), bandScan(ppm * wobble, { metadata: { ...reference } }));
    rows.push(`${name},${ppm},,,,1,L${i}`);
  });
  writeFileSync(at('standards.csv'), `${rows.join('\n')}\n`);
  // A sample at 150 ppm in a 2 m cell at 310 K: φ = 2 × 296.15/310.
  const phi = (2 * 296.15) / 310;
  writeScan(
    at('sample.jdx'),
    bandScan(150, { phi, metadata: { pathLength_m: 2, temperature_K: 310, pressure_kPa: 101.325 } }),
  );
  writeScan(at('zero.csv'), bandScan(0, { metadata: reference }));
});
afterAll(() => folder.cleanup());

describe('calibrate then quantify', () => {
  it('builds a calibration from CSV and JCAMP-DX standards and prints its statistics', async () => {
    const run = await runCli('calibrate', at('standards.csv'), ...bandArgs, '-o', at('co.json'));
    expect(run.stderr).toMatch(/calibration written to/);
    expect(run.status).toBe(0);
    expect(run.stdout).toMatch(/CO: band area over 2040–2245 cm⁻¹/);
    expect(run.stdout).toMatch(/linearity \(Mandel test\)/);
    expect(run.stdout).toMatch(/not a life-safety monitor/);
    const calibration = readJsonAs<Calibration>(at('co.json'));
    expect(calibration.schemaVersion).toBe('2.0');
    expect(calibration.inputs.filter((i) => i.role === 'standard')).toHaveLength(10);
    // Slope = area per ppm at reference conditions (analytic band area).
    expect(calibration.gases[0]?.model.coefficients.b).toBeCloseTo(0.02, 4);
  });

  it('quantifies a sample at other conditions within its interval (terminal table)', async () => {
    const run = await runCli('quantify', at('co.json'), at('sample.jdx'));
    expect(run.status).toBe(0);
    expect(run.stdout).toMatch(/95 % interval/);
    expect(run.stdout).toMatch(/sample\.jdx\s+CO\s+1(4|5)\d\.\d+/);
    expect(run.stdout).toMatch(/Caution:/);
  });

  it('gives the JSON of DESIGN §4 with the truth inside the interval', async () => {
    const run = await runCli('quantify', at('co.json'), at('sample.jdx'), at('zero.csv'), '--json');
    expect(run.status).toBe(0);
    const document = parseJsonAs<QuantifyDocument>(run.stdout);
    expect(document.tool.name).toBe('bandwright');
    expect(document.calibration.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(document.level).toBe(0.95);
    const [sample, zero] = document.results.map(scanResult);
    expect(sample?.conditions).toEqual({ pathLength_m: 2, temperature_K: 310, pressure_kPa: 101.325 });
    const co = gasAt(sample);
    expect(co).toMatchObject({ gas: 'CO', unit: 'ppm' });
    expect(co.low).toBeLessThan(150);
    expect(co.high).toBeGreaterThan(150);
    expect(Math.abs(co.value - 150)).toBeLessThan(1.5);
    expect(co.flags).toContain('conditions-far');
    expect(sample?.cautions.length).toBeGreaterThan(0);
    expect(gasAt(zero).flags).toContain('below-lod');
  });

  it('writes one CSV row per scan with the DESIGN §4 columns', async () => {
    const run = await runCli('quantify', at('co.json'), at('sample.jdx'), '--csv', at('results.csv'));
    expect(run.status).toBe(0);
    const parsed = Papa.parse<Record<string, string>>(readFileSync(at('results.csv'), 'utf8').trim(), {
      header: true,
    });
    expect(parsed.meta.fields).toEqual([
      'scan',
      'CO_ppm',
      'CO_low',
      'CO_high',
      'CO_flags',
      'residual_rms',
      'calibration_sha256',
      'error',
      'warnings',
    ]);
    expect(Number(parsed.data[0]?.CO_ppm)).toBeCloseTo(150, 0);
    const again = await runCli('quantify', at('co.json'), at('sample.jdx'), '--csv', at('results.csv'));
    expect(again.status).toBe(1);
    expect(again.stderr).toMatch(/results.csv exists; use --force/);
  });

  it('quantifies given responses, and mg/m³ with its reference conditions printed', async () => {
    const run = await runCli(
      'quantify',
      at('co.json'),
      '--response',
      '2.0',
      '--response',
      '2.02',
      '--mg-m3',
      '--json',
    );
    expect(run.status).toBe(0);
    const gas = gasAt(parseJsonAs<QuantifyDocument>(run.stdout).results[0]);
    expect(gas.value).toBeCloseTo(100.5, 0);
    const conversion = gas.conversions?.[0];
    if (conversion === undefined) expect.fail(`no conversion in ${JSON.stringify(gas)}`);
    expect(conversion.unit).toBe('mg/m3');
    expect(conversion.assumption).toMatch(/273.15 K and 101.325 kPa/);
    // 1 ppm CO = 1.2497 mg/m³ at 0 °C (facts.md, computed).
    expect(conversion.value / gas.value).toBeCloseTo(1.2497, 3);
  });

  it('calibrates from a responses table', async () => {
    writeFileSync(
      at('responses.csv'),
      'concentration,response\n0,0.01\n0,-0.01\n10,1.02\n10,0.99\n20,2.01\n20,1.98\n40,4.0\n40,4.02\n',
    );
    const run = await runCli(
      'calibrate',
      '--responses',
      at('responses.csv'),
      '--gas',
      'CO',
      '-o',
      at('responses.cal.json'),
    );
    expect(run.status).toBe(0);
    const quantified = await runCli('quantify', at('responses.cal.json'), '--response', '3.0', '--json');
    expect(gasAt(parseJsonAs<QuantifyDocument>(quantified.stdout).results[0]).value).toBeCloseTo(30, 0);
  });
});

describe('result flags', () => {
  it('flags a sample above the calibrated range as extrapolated', async () => {
    writeScan(at('high.csv'), bandScan(600, { metadata: reference }));
    const run = await runCli('quantify', at('co.json'), at('high.csv'), '--json');
    const gas = gasAt(parseJsonAs<QuantifyDocument>(run.stdout).results[0]);
    expect(gas.flags).toContain('extrapolated');
    expect(gas.notes.join(' ')).toMatch(/outside the calibrated range/);
    expect(gas.notes.filter((n) => /outside the calibrated range/.test(n))).toHaveLength(1);
  });

  it('flags saturation against the method threshold', async () => {
    writeFileSync(
      at('low-threshold.json'),
      JSON.stringify({
        gases: [
          {
            name: 'CO',
            band: [2040, 2245],
            baseline: [
              [2000, 2030],
              [2255, 2290],
            ],
          },
        ],
        saturationAbsorbance: 0.05,
      }),
    );
    expect(
      (
        await runCli(
          'calibrate',
          at('standards.csv'),
          '--method',
          at('low-threshold.json'),
          '-o',
          at('low-threshold.cal.json'),
        )
      ).status,
    ).toBe(0);
    const run = await runCli('quantify', at('low-threshold.cal.json'), at('sample.jdx'), '--json');
    expect(gasAt(parseJsonAs<QuantifyDocument>(run.stdout).results[0]).flags).toContain('saturated');
  });

  it('flags over-limit on the interval upper end with the example limits file (NIOSH REL 35 ppm TWA for CO, facts.md)', async () => {
    writeScan(at('near-limit.csv'), bandScan(34.8, { metadata: reference }));
    const limits = join(import.meta.dirname, '..', '..', 'examples', 'limits.csv');
    const run = await runCli('quantify', at('co.json'), at('near-limit.csv'), '--limits', limits, '--json');
    const gas = gasAt(parseJsonAs<QuantifyDocument>(run.stdout).results[0]);
    // The central value is below 35 ppm but the interval reaches over it.
    expect(gas.value).toBeLessThan(35);
    expect(gas.high).toBeGreaterThan(35);
    expect(gas.flags).toContain('over-limit');
    expect(gas.notes.join(' ')).toMatch(/NIOSH REL TWA limit of 35 ppm .*local rules govern/);
  });
});
