/**
 * Classical least squares from files, end to end: simulated stack standards and samples written
 * to a folder → calibrate with a cls method → quantify (table, JSON, CSV), with the refusals and
 * the stack-reporting conversions.
 *
 * Known truth: every scan comes from the project's line-by-line simulator (`src/simulate/`: CO,
 * N2O and CO2 lines from molecular constants, the approximate water band model, Voigt profiles,
 * triangular apodisation, 3e-4 AU seeded noise) in a heated 2 m cell at 453.15 K; the
 * concentrations put in are the truth (synthetic, known truth).
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { simulateSpectrum } from '../../src/simulate/index.js';
import { writeScan } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import { scanResult, type QuantifyDocument } from '../helpers/documents.js';
import { parseJsonAs, readJsonAs } from '../helpers/json.js';
import type { Calibration } from '../../src/calibration/calibration.js';
import type { ScanResult } from '../../src/calibration/result.js';

const folder = temporaryFolder('bandwright-cls-');
const at = (name: string) => join(folder.path, name);

/** Concentrations, ppm (a type rather than an interface, so that Object.entries knows its values are numbers). */
type Gases = Record<'CO' | 'N2O' | 'CO2' | 'H2O', number>;
const NONE: Gases = { CO: 0, N2O: 0, CO2: 0, H2O: 0 };

function simulate(gases: Gases, seed: number, range: readonly [number, number] = [1985, 2255]) {
  return simulateSpectrum({
    pathLength_m: 2,
    temperature_K: 453.15,
    pressure_kPa: 100.9,
    resolution_cm: 0.5,
    apodization: 'triangular',
    range_cm: range,
    noiseRms_AU: 3e-4,
    seed,
    gases: Object.entries(gases)
      .filter(([, ppm]) => ppm > 0)
      .map(([name, ppm]) => ({ name, ppm })),
  }).spectrum;
}

/** Standards as a stack team prepares them: zero gas, each gas alone at several levels, mixtures. */
const STANDARDS: [string, Gases][] = [
  ['zero-a', NONE],
  ['zero-b', NONE],
  ...[25, 50, 100, 200, 300].map((ppm): [string, Gases] => [`co-${ppm}`, { ...NONE, CO: ppm }]),
  ...[5, 10, 20, 40].map((ppm): [string, Gases] => [`n2o-${ppm}`, { ...NONE, N2O: ppm }]),
  ...[4, 8, 12].map((pct): [string, Gases] => [`co2-${pct}`, { ...NONE, CO2: pct * 1e4 }]),
  ...[8, 11, 14, 17, 20].map((pct): [string, Gases] => [`h2o-${pct}`, { ...NONE, H2O: pct * 1e4 }]),
  ['mix-1', { CO: 150, N2O: 25, CO2: 100000, H2O: 150000 }],
  ['mix-2', { CO: 60, N2O: 8, CO2: 90000, H2O: 120000 }],
  ['mix-3', { CO: 250, N2O: 35, CO2: 110000, H2O: 100000 }],
];

/** Samples and their truth. */
const SAMPLES: [string, Gases][] = [
  ['k2-a.jdx', { CO: 74, N2O: 22, CO2: 99000, H2O: 165000 }],
  ['k2-b.jdx', { CO: 160, N2O: 11, CO2: 91000, H2O: 125000 }],
];

const METHOD = {
  title: 'test stack method',
  model: 'cls',
  gases: [
    { name: 'CO', unit: 'ppm', secondOrder: true },
    { name: 'N2O', unit: 'ppm', secondOrder: true },
  ],
  interferents: [
    { name: 'CO2', unit: 'pct' },
    { name: 'H2O', unit: 'pct', secondOrder: true },
  ],
  regions: [
    [1992, 2025],
    [2030, 2075.5],
    [2201.5, 2250],
  ],
  baselineOrder: 1,
};

function manifest(
  name: string,
  rows: [string, Gases][],
  columns: readonly (keyof Gases)[] = ['CO', 'N2O', 'CO2', 'H2O'],
): string {
  const header = [
    'scan',
    ...columns.map((gas) => (gas === 'CO2' || gas === 'H2O' ? `${gas}_pct` : `${gas}_ppm`)),
  ].join(',');
  const lines = rows.map(([scan, gases]) =>
    [
      `${scan}.jdx`,
      ...columns.map((gas) => (gas === 'CO2' || gas === 'H2O' ? gases[gas] / 1e4 : gases[gas])),
    ].join(','),
  );
  writeFileSync(at(name), `${[header, ...lines].join('\n')}\n`);
  return at(name);
}

beforeAll(() => {
  STANDARDS.forEach(([name, gases], i) => writeScan(at(`${name}.jdx`), simulate(gases, 7000 + i)));
  SAMPLES.forEach(([name, gases], i) => writeScan(at(name), simulate(gases, 8000 + i)));
  manifest('standards.csv', STANDARDS);
  writeFileSync(at('method.json'), JSON.stringify(METHOD));
  // A scan from a narrower export that does not reach the first region.
  writeScan(at('narrow.jdx'), simulate(SAMPLES[0]![1], 8100, [2100, 2300]));
  // Collinear standards: N2O always a tenth of CO.
  const collinear: [string, Gases][] = [0, 40, 80, 120, 160, 200, 240, 280].map((co, i) => [
    `coll-${i}`,
    { CO: co, N2O: co / 10, CO2: [0, 4, 8, 12][i % 4]! * 1e4, H2O: [0, 8, 14, 20][(i + 1) % 4]! * 1e4 },
  ]);
  collinear.forEach(([name, gases], i) => writeScan(at(`${name}.jdx`), simulate(gases, 7500 + i)));
  manifest('collinear.csv', collinear);
  // A method without N2O, calibrated on the standards that hold none; a sample with N2O.
  writeFileSync(at('method-no-n2o.json'), JSON.stringify({ ...METHOD, gases: [METHOD.gases[0]] }));
  manifest(
    'standards-no-n2o.csv',
    STANDARDS.filter(([, gases]) => gases.N2O === 0),
    ['CO', 'CO2', 'H2O'],
  );
  writeScan(at('with-n2o.jdx'), simulate({ CO: 90, N2O: 25, CO2: 95000, H2O: 140000 }, 8200));
  writeScan(at('without-n2o.jdx'), simulate({ CO: 90, N2O: 0, CO2: 95000, H2O: 140000 }, 8201));
});
afterAll(() => folder.cleanup());

async function quantifyJson(...args: string[]): Promise<ScanResult[]> {
  const run = await runCli('quantify', at('stack.json'), ...args, '--json');
  expect(run.status, run.stderr).toBe(0);
  return parseJsonAs<QuantifyDocument>(run.stdout).results.map(scanResult);
}

/** x_H2O of a result, from its interferent warning (printed to 4 significant digits). */
function waterFraction(result: ScanResult): number {
  const text = result.warnings.map((w) => `${w.code}: ${w.message}`).join('\n');
  const match = /interferent: interferent H2O modelled at ([\d.]+) % \(not reported\)/.exec(text);
  expect(match, text).not.toBeNull();
  return Number(match![1]) / 100;
}

describe('calibrate a cls method from files', () => {
  it('builds the calibration and prints its regions, components and statistics', async () => {
    const run = await runCli(
      'calibrate',
      at('standards.csv'),
      '--method',
      at('method.json'),
      '-o',
      at('stack.json'),
    );
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toMatch(
      /classical least squares over 1992–2025 cm⁻¹, 2030–2075.5 cm⁻¹, 2201.5–2250 cm⁻¹ \(\d+ channels\), baseline order 1 per region/,
    );
    expect(run.stdout).toMatch(/CO: first and second order, standards 0–\d+(\.\d+)? ppm/);
    expect(run.stdout).toMatch(/CO2 \(interferent, not reported\): first order/);
    expect(run.stdout).toMatch(/H2O \(interferent, not reported\): first and second order/);
    const calibration = readJsonAs<Calibration>(at('stack.json'));
    expect(calibration.method.model).toBe('cls');
    expect(calibration.inputs.filter((input) => input.role === 'standard')).toHaveLength(STANDARDS.length);
  });
});

describe('quantify with a cls calibration', () => {
  it('JSON: CO and N2O with intervals that hold the truth, within 2 % or 1 ppm; the interferents are not reported', async () => {
    const results = await quantifyJson(at('k2-a.jdx'), at('k2-b.jdx'));
    results.forEach((result, k) => {
      const truth = SAMPLES[k]![1];
      expect(result.gases.map((g) => g.gas)).toEqual(['CO', 'N2O']);
      for (const gas of result.gases) {
        const expected = truth[gas.gas as 'CO' | 'N2O'];
        const shown = `${result.scan} ${gas.gas}: ${gas.value} [${gas.low}, ${gas.high}], truth ${expected}`;
        expect(gas.low, shown).toBeLessThanOrEqual(expected);
        expect(gas.high, shown).toBeGreaterThanOrEqual(expected);
        expect(Math.abs(gas.value - expected), shown).toBeLessThan(Math.max(1, 0.02 * expected));
        expect(gas.flags, shown).toEqual([]);
      }
      expect(result.warnings.map((w) => `${w.code}: ${w.message}`).join('\n')).toMatch(
        /interferent: interferent CO2 modelled at [\d.]+ % \(not reported\)/,
      );
      expect(result.residualRms).toBeGreaterThan(0);
    });
  });

  it('CSV: value, low, high and flags columns for each reported gas only', async () => {
    const run = await runCli('quantify', at('stack.json'), at('k2-a.jdx'), '--csv', at('results.csv'));
    expect(run.status, run.stderr).toBe(0);
    const parsed = Papa.parse<Record<string, string>>(readFileSync(at('results.csv'), 'utf8').trim(), {
      header: true,
    });
    expect(parsed.meta.fields).toEqual([
      'scan',
      'CO_ppm',
      'CO_low',
      'CO_high',
      'CO_flags',
      'N2O_ppm',
      'N2O_low',
      'N2O_high',
      'N2O_flags',
      'residual_rms',
      'calibration_sha256',
      'error',
      'warnings',
    ]);
    expect(Number(parsed.data[0]!.CO_ppm)).toBeCloseTo(74, -0.5);
    expect(Number(parsed.data[0]!.N2O_ppm)).toBeCloseTo(22, 0);
    expect(run.stdout).not.toMatch(/\bCO2\s+\d/);
    expect(run.stdout).not.toMatch(/\bH2O\s+\d/);
  });

  it('a scan whose grid does not cover the regions fails in its batch row, naming the scan and the region; exit status 1', async () => {
    const run = await runCli(
      'quantify',
      at('stack.json'),
      at('k2-a.jdx'),
      at('narrow.jdx'),
      '--csv',
      at('batch.csv'),
    );
    expect(run.status).toBe(1);
    const message =
      /narrow\.jdx: covers 2100–2300 cm⁻¹, which does not contain the calibration's region 1992–2025 cm⁻¹/;
    expect(run.stderr).toMatch(message);
    expect(run.stderr).toMatch(/1 of 2 scan\(s\) could not be quantified/);
    expect(run.stdout).toMatch(/narrow\.jdx\s+—\s+failed/);
    const rows = Papa.parse<Record<string, string>>(readFileSync(at('batch.csv'), 'utf8').trim(), {
      header: true,
    }).data;
    expect(rows[0]!.error).toBe('');
    expect(rows[1]!.error).toMatch(message);
    expect(rows[1]!.CO_ppm).toBe('');
  });
});

describe('refusals', () => {
  it('collinear standards (N2O always a tenth of CO) are refused naming both gases, and nothing is written', async () => {
    const before = folder.files();
    const run = await runCli(
      'calibrate',
      at('collinear.csv'),
      '--method',
      at('method.json'),
      '-o',
      at('collinear.json'),
    );
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(
      /standards' concentrations cannot separate the gases: (.*\bCO\b.*\bN2O\b|.*\bN2O\b.*\bCO\b)/,
    );
    expect(run.stderr).not.toMatch(/CO2|H2O/);
    expect(run.stderr).toMatch(/keep the same ratio/);
    expect(existsSync(at('collinear.json'))).toBe(false);
    expect(folder.files()).toEqual(before);
  });
});

describe('stack reporting: each conversion printed with its assumptions', () => {
  it('--dry with water measured in the same scan: c_dry = c_wet / (1 − x_H2O) (DESIGN §3, common practice)', async () => {
    const [result] = await quantifyJson(at('k2-a.jdx'), '--dry');
    const x = waterFraction(result!);
    // The sample holds 16.5 % water: the scan's own estimate is used.
    expect(x).toBeGreaterThan(0.16);
    expect(x).toBeLessThan(0.17);
    for (const gas of result!.gases) {
      const dry = gas.conversions![0]!;
      expect(dry.kind).toBe('dry');
      // x is printed to 4 significant digits: relative tolerance 1e-4.
      expect(dry.value / (gas.value / (1 - x)) - 1).toBeLessThan(1e-4);
      expect(dry.low).toBeLessThan(dry.value);
      expect(dry.assumption).toMatch(
        /dry basis: c_dry = c_wet \/ \(1 − x_H2O\), water vapour 16\.\d\d % measured in the same scan/,
      );
    }
    const text = await runCli('quantify', at('stack.json'), at('k2-a.jdx'), '--dry');
    expect(text.stdout).toMatch(/^\s+dry\s+[\d.]+\s+[\d.]+ – [\d.]+\s+ppm/m);
    expect(text.stdout).toMatch(
      /k2-a\.jdx CO dry: dry basis: c_dry = c_wet \/ \(1 − x_H2O\), water vapour 16\.\d\d % measured in the same scan/,
    );
  });

  it('--dry --h2o 12: the given water fraction instead, exactly c / 0.88', async () => {
    const [result] = await quantifyJson(at('k2-a.jdx'), '--dry', '--h2o', '12');
    for (const gas of result!.gases) {
      const dry = gas.conversions![0]!;
      expect(dry.value).toBeCloseTo(gas.value / 0.88, 9);
      expect(dry.assumption).toMatch(/water vapour 12\.00 % as given/);
    }
  });

  it('--o2 10 --o2-ref 7 on the dry value: × (20.9 − 7)/(20.9 − 10) = 1.27523 (40 CFR 60, facts.md)', async () => {
    const [result] = await quantifyJson(
      at('k2-a.jdx'),
      '--dry',
      '--h2o',
      '12',
      '--o2',
      '10',
      '--o2-ref',
      '7',
    );
    for (const gas of result!.gases) {
      const [dry, oxygen] = gas.conversions!;
      expect(oxygen!.kind).toBe('O2-corrected');
      expect(oxygen!.value / dry!.value).toBeCloseTo(1.27523, 5);
      expect(oxygen!.assumption).toMatch(
        /corrected to 7 % O2: c × \(20.9 − 7\) \/ \(20.9 − 10\), O2 measured 10 %, O2 of air 20.9 %, on the dry basis above/,
      );
    }
    const text = await runCli(
      'quantify',
      at('stack.json'),
      at('k2-a.jdx'),
      '--dry',
      '--h2o',
      '12',
      '--o2',
      '10',
      '--o2-ref',
      '7',
    );
    expect(text.stdout).toMatch(/k2-a\.jdx N2O O2-corrected: corrected to 7 % O2/);
  });

  it('--mg-m3: 1 ppm CO = 1.2497 mg/m³ and 1 ppm N2O = 1.9636 mg/m³ at 273.15 K and 101.325 kPa, reference state printed', async () => {
    // Ideal gas, M·P/(R·T): CO 28.010 g/mol (facts.md: 1.2497, computed); N2O 44.013 g/mol,
    // 44.013 × 101325 / (8.314462618 × 273.15) / 1000 = 1.9636 (CODATA R; computed).
    const [result] = await quantifyJson(at('k2-a.jdx'), '--mg-m3');
    const factor = { CO: 1.2497, N2O: 1.9636 };
    for (const gas of result!.gases) {
      const mass = gas.conversions![0]!;
      expect(mass.kind).toBe('mg/m3');
      expect(mass.unit).toBe('mg/m3');
      expect(mass.value / gas.value).toBeCloseTo(factor[gas.gas as 'CO' | 'N2O'], 4);
      expect(mass.assumption).toMatch(
        /mass concentration at 273.15 K and 101.325 kPa \(ideal gas, M = \d+\.\d{3} g\/mol\)/,
      );
    }
    const chained = await quantifyJson(at('k2-a.jdx'), '--dry', '--mg-m3');
    expect(chained[0]!.gases[0]!.conversions![1]!.assumption).toMatch(/of the dry value/);
    const text = await runCli('quantify', at('stack.json'), at('k2-a.jdx'), '--mg-m3');
    expect(text.stdout).toMatch(/^\s+mg\/m3\s+[\d.]+\s+[\d.]+ – [\d.]+\s+mg\/m3/m);
    expect(text.stdout).toMatch(
      /k2-a\.jdx CO mg\/m3: mass concentration at 273.15 K and 101.325 kPa \(ideal gas, M = 28.010 g\/mol\)/,
    );
  });
});

describe('poor fit', () => {
  it('a sample with an absorber missing from the method (N2O, absent from a CO-only method) is flagged poor-fit; one without it is not', async () => {
    const calibrate = await runCli(
      'calibrate',
      at('standards-no-n2o.csv'),
      '--method',
      at('method-no-n2o.json'),
      '-o',
      at('no-n2o.json'),
    );
    expect(calibrate.status, calibrate.stderr).toBe(0);
    const run = await runCli(
      'quantify',
      at('no-n2o.json'),
      at('with-n2o.jdx'),
      at('without-n2o.jdx'),
      '--json',
    );
    expect(run.status, run.stderr).toBe(0);
    const [withN2o, withoutN2o] = parseJsonAs<QuantifyDocument>(run.stdout).results.map(scanResult);
    const co = withN2o!.gases[0]!;
    expect(co.flags).toContain('poor-fit');
    expect(co.notes.join('\n')).toMatch(
      /the fit leaves a residual [\d.]+× the calibration's \(limit [\d.]+\): an absorber the method does not model may be present/,
    );
    expect(withoutN2o!.gases[0]!.flags).not.toContain('poor-fit');
    expect(withN2o!.residualRms).toBeGreaterThan(3 * withoutN2o!.residualRms!);
  });
});
