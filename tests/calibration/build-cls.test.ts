/**
 * Classical-least-squares calibrations from standards (build-cls) and their use on scans
 * (quantifyClsScan): channel grid, resampling, manifest checks, blank-based detection limits,
 * warnings, interferents and the dry basis from water measured in the same scan.
 *
 * Data: the project's line-by-line simulator (`src/simulate/`) — CO lines from molecular
 * constants and the approximate water band model — in a 2 m cell at 453.15 K, 0.5 cm⁻¹,
 * triangular apodisation, 3e-4 AU noise, seeded (synthetic, known truth).
 */
import { describe, expect, it } from 'vitest';
import type { StandardScan } from '../../src/calibration/build.js';
import { buildClsCalibration, channelsFromScan, onChannels } from '../../src/calibration/build-cls.js';
import { parseMethod, type ClsMethod } from '../../src/calibration/method.js';
import { quantifyClsScan } from '../../src/calibration/quantify.js';
import { isBandwrightError } from '../../src/errors.js';
import { predictCls } from '../../src/models/cls/spectral.js';
import { simulateSpectrum } from '../../src/simulate/index.js';
import { resample, type Spectrum } from '../../src/spectrum/spectrum.js';

const CELL = {
  pathLength_m: 2,
  temperature_K: 453.15,
  pressure_kPa: 101.325,
  resolution_cm: 0.5,
  apodization: 'triangular' as const,
  noiseRms_AU: 3e-4,
};
const RANGE = [1985, 2085] as const;

function scan(
  gases: { CO?: number; H2O?: number },
  seed: number,
  options: { range?: readonly [number, number]; pathLength_m?: number; noise?: number } = {},
): Spectrum {
  const spectrum = simulateSpectrum({
    ...CELL,
    pathLength_m: options.pathLength_m ?? CELL.pathLength_m,
    noiseRms_AU: options.noise ?? CELL.noiseRms_AU,
    range_cm: options.range ?? RANGE,
    seed,
    gases: Object.entries(gases)
      .filter(([, ppm]) => ppm > 0)
      .map(([name, ppm]) => ({ name, ppm })),
  }).spectrum;
  return { ...spectrum, metadata: { ...spectrum.metadata, source: `scan-${seed}` } };
}

function method(overrides: Record<string, unknown> = {}): ClsMethod {
  return parseMethod(
    {
      model: 'cls',
      gases: [{ name: 'CO', unit: 'ppm', secondOrder: true }],
      interferents: [{ name: 'H2O', unit: 'pct', secondOrder: true }],
      regions: [
        [1992, 2025],
        [2030, 2075.5],
      ],
      ...overrides,
    },
    'method.json',
  ) as ClsMethod;
}

/** CO (ppm) and water (ppm) of each standard: zero twice, CO and water alone, two mixtures. */
const DESIGN: [number, number][] = [
  [0, 0],
  [0, 0],
  [25, 0],
  [50, 0],
  [100, 0],
  [200, 0],
  [0, 50000],
  [0, 100000],
  [0, 150000],
  [0, 200000],
  [80, 120000],
  [150, 60000],
];

function standards(
  options: { shiftEvery?: number; design?: readonly [number, number][]; omitWater?: boolean } = {},
): StandardScan[] {
  return (options.design ?? DESIGN).map(([co, h2o], i) => {
    // Every `shiftEvery`-th standard comes from an instrument whose grid is offset by 0.125 cm⁻¹.
    const shifted = options.shiftEvery !== undefined && i % options.shiftEvery === 1;
    const range: readonly [number, number] = shifted ? [RANGE[0] + 0.125, RANGE[1] + 0.125] : RANGE;
    return {
      scan: `standards/std-${i}.jdx`,
      line: i + 2,
      spectrum: scan({ CO: co, H2O: h2o }, 700 + i, { range }),
      concentrations: [
        { gas: 'CO', unit: 'ppm' as const, value: co },
        ...(options.omitWater ? [] : [{ gas: 'H2O', unit: 'pct' as const, value: h2o / 1e4 }]),
      ],
      conditions: {},
    };
  });
}

const context = { inputs: [], createdAt: '2026-12-01T00:00:00Z' };

function thrown(action: () => unknown): Error {
  try {
    action();
  } catch (error) {
    return error as Error;
  }
  throw new Error('expected an error, none was thrown');
}

describe('channel grid', () => {
  it('takes the first scan’s points inside each region, ends included, each labelled with its region', () => {
    const first = scan({}, 1, { noise: 0 });
    const { grid, regionOf } = channelsFromScan(first, method().regions);
    // 0.25 cm⁻¹ spacing (the simulator samples at resolution / 2): 1992–2025 holds 133 points,
    // 2030–2075.5 holds 183 (arithmetic).
    expect(grid.length).toBe(133 + 183);
    expect(grid[0]).toBe(1992);
    expect(grid[132]).toBe(2025);
    expect(grid[133]).toBe(2030);
    expect(grid[grid.length - 1]).toBe(2075.5);
    expect(Array.from(regionOf.slice(130, 136))).toEqual([0, 0, 0, 1, 1, 1]);
  });

  it('refuses a region the scan does not cover, naming the scan and the region; and a region of fewer than 3 points', () => {
    const narrow = scan({}, 1, { range: [2000, 2085], noise: 0 });
    const error = thrown(() => channelsFromScan(narrow, method().regions));
    expect(isBandwrightError(error, 'WINDOW')).toBe(true);
    expect(error.message).toMatch(
      /scan-1: covers 2000–2085 cm⁻¹, which does not contain the calibration's region 1992–2025 cm⁻¹/,
    );
    const tiny = thrown(() => channelsFromScan(scan({}, 1, { noise: 0 }), [[2000.1, 2000.4]]));
    expect(tiny.message).toMatch(/region 2000.1–2000.4 cm⁻¹ holds 1 grid point\(s\), needs at least 3/);
    // A sample is refused the same way when quantified.
    expect(() => onChannels(narrow, Float64Array.from([2000, 2001]), method().regions)).toThrow(
      /scan-1: covers 2000–2085 cm⁻¹, which does not contain the calibration's region 1992–2025 cm⁻¹/,
    );
  });
});

describe('scans on other grids (onChannels)', () => {
  const calibration = buildClsCalibration(method(), standards(), context);
  const model = calibration.cls!.model;
  const grid = Float64Array.from(model.grid!);
  const regions = calibration.cls!.regions;
  const truth = { CO: 120, H2O: 110000 };
  const onGrid = predictCls(model, onChannels(scan(truth, 91, { noise: 0 }), grid, regions), { phi: 1 });

  it('takes a scan’s own values where its points are the channels (no interpolation)', () => {
    const sample = scan(truth, 91, { noise: 0 });
    const values = onChannels(sample, grid, regions);
    const start = sample.x.indexOf(1992);
    expect(Array.from(values.slice(0, 5))).toEqual(Array.from(sample.y.slice(start, start + 5)));
  });

  it.each([0.05, 0.125])(
    'a scan on a grid offset by %f cm⁻¹ reads within 0.5 ppm of the same gas on the channels (band-limited interpolation in transmittance); linear interpolation of absorbance does not',
    (offset) => {
      const shifted = scan(truth, 91, { noise: 0, range: [RANGE[0] + offset, RANGE[1] + offset] });
      const lanczos = predictCls(model, onChannels(shifted, grid, regions), { phi: 1 });
      const linear = predictCls(model, resample(shifted, grid).y, { phi: 1 });
      const table = `on grid ${onGrid.estimates[0]!.value}, Lanczos ${lanczos.estimates[0]!.value} (fit ${lanczos.fitRatio}), linear ${linear.estimates[0]!.value} (fit ${linear.fitRatio})`;
      expect(Math.abs(lanczos.estimates[0]!.value - onGrid.estimates[0]!.value), table).toBeLessThan(0.5);
      expect(lanczos.flags, table).toEqual([]);
      // Linear interpolation flattens lines two or three samples wide: several ppm low and a poor fit.
      expect(onGrid.estimates[0]!.value - linear.estimates[0]!.value, table).toBeGreaterThan(5);
      expect(linear.flags, table).toContain('poor-fit');
    },
  );

  it('falls back to linear interpolation for a scan on a non-uniform grid', () => {
    const sample = scan(truth, 91, { noise: 0 });
    const keep = Array.from(sample.x.keys()).filter((i) => i % 7 !== 3);
    const irregular: Spectrum = {
      ...sample,
      x: Float64Array.from(keep, (i) => sample.x[i]!),
      y: Float64Array.from(keep, (i) => sample.y[i]!),
    };
    expect(Array.from(onChannels(irregular, grid, regions))).toEqual(Array.from(resample(irregular, grid).y));
  });
});

describe('buildClsCalibration', () => {
  const calibration = buildClsCalibration(method(), standards(), context);
  const cls = calibration.cls!;

  it('records the model, regions, every component’s concentration per standard, and no univariate gases', () => {
    expect(calibration.method.model).toBe('cls');
    expect(calibration.gases).toEqual([]);
    expect(cls.regions).toEqual([
      [1992, 2025],
      [2030, 2075.5],
    ]);
    expect(cls.model.components.map((c) => [c.name, c.reported])).toEqual([
      ['CO', true],
      ['H2O', false],
    ]);
    expect(calibration.standards[10]!.concentrations).toEqual({ CO: 80, H2O: 12 });
    expect(calibration.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('detection limit = 3.3 × the prediction standard error of a blank (the 3.3 σ convention, ICH Q2; common practice)', () => {
    const blank = predictCls(cls.model, new Float64Array(cls.model.channelCount), { phi: 1 });
    expect(cls.detectionLimits.CO).toBeCloseTo(3.3 * blank.estimates[0]!.se, 12);
    expect(cls.detectionLimits).not.toHaveProperty('H2O');
  });

  it('combines standards from a grid offset by 0.125 cm⁻¹ (resampled onto the first standard’s grid) and still recovers a sample', () => {
    const mixed = buildClsCalibration(method(), standards({ shiftEvery: 3 }), context);
    expect(mixed.cls!.model.grid).toEqual(cls.model.grid);
    const sample = scan({ CO: 120, H2O: 110000 }, 91, { range: [RANGE[0] + 0.125, RANGE[1] + 0.125] });
    const co = quantifyClsScan(mixed, sample).gases[0]!;
    expect(co.low).toBeLessThanOrEqual(120);
    expect(co.high).toBeGreaterThanOrEqual(120);
    // Within 2 % (or 0.5 ppm): the stack target for CO.
    expect(Math.abs(co.value - 120)).toBeLessThan(Math.max(0.5, 0.02 * 120));
  });

  it('refuses a manifest that lacks a modelled component, naming the standard and the gas', () => {
    const error = thrown(() => buildClsCalibration(method(), standards({ omitWater: true }), context));
    expect(isBandwrightError(error, 'INVALID_VALUE')).toBe(true);
    expect(error.message).toMatch(
      /standards\/std-0.jdx \(manifest line 2\): the manifest has no H2O column, but the method models H2O; give its concentration \(0 when absent\)/,
    );
  });

  it('warns when the standards reach the saturation absorbance of the method', () => {
    const strict = buildClsCalibration(method({ saturationAbsorbance: 0.3 }), standards(), context);
    expect(strict.warnings.join('\n')).toMatch(
      /the standards reach absorbance 0\.\d\d in the regions, above 0.3: lines saturate/,
    );
    expect(calibration.warnings.join('\n')).not.toMatch(/lines saturate/);
  });

  it('carries the model’s lack-of-fit warning: water without its second-order term', () => {
    const linearWater = buildClsCalibration(
      method({ interferents: [{ name: 'H2O', unit: 'pct' }] }),
      standards(),
      context,
    );
    expect(linearWater.warnings.join('\n')).toMatch(
      /lack of fit: .*a second-order term would remove \d+ % of it for H2O.*give H2O a second-order term/,
    );
  });
});

describe('quantifyClsScan', () => {
  const calibration = buildClsCalibration(method(), standards(), context);

  it('reports CO only; water is an interferent named in the warnings; the truth is inside the interval', () => {
    const result = quantifyClsScan(calibration, scan({ CO: 60, H2O: 140000 }, 92));
    expect(result.gases.map((g) => g.gas)).toEqual(['CO']);
    const co = result.gases[0]!;
    expect(co.low).toBeLessThanOrEqual(60);
    expect(co.high).toBeGreaterThanOrEqual(60);
    expect(result.warnings.map((w) => `${w.code}: ${w.message}`).join('\n')).toMatch(
      /interferent: interferent H2O modelled at 1[34]\.\d+ % \(not reported\)/,
    );
    expect(result.residualRms).toBeGreaterThan(0);
    expect(result.cautions.join('\n')).toMatch(/CO \(carbon monoxide\) is toxic/);
  });

  it('dry basis with water measured in the same scan: c_dry = c_wet / (1 − x_H2O), x_H2O the interferent’s estimate (DESIGN §3)', () => {
    const sample = scan({ CO: 60, H2O: 140000 }, 92);
    const wet = quantifyClsScan(calibration, sample);
    const dry = quantifyClsScan(calibration, sample, { dryBasis: {} });
    const values = onChannels(
      sample,
      Float64Array.from(calibration.cls!.model.grid!),
      calibration.cls!.regions,
    );
    const water = predictCls(calibration.cls!.model, values, { phi: 1 }).interferents[0]!.value / 100;
    const conversion = dry.gases[0]!.conversions![0]!;
    expect(conversion.kind).toBe('dry');
    expect(conversion.value).toBeCloseTo(wet.gases[0]!.value / (1 - water), 9);
    expect(conversion.assumption).toMatch(/water vapour 1[34]\.\d\d % measured in the same scan/);
  });

  it('a zero-gas scan is below the detection limit, and the limit scales with 1/φ (a 1 m cell doubles it)', () => {
    const twoMetres = quantifyClsScan(calibration, scan({}, 93)).gases[0]!;
    const oneMetre = quantifyClsScan(calibration, scan({}, 94, { pathLength_m: 1 })).gases[0]!;
    expect(twoMetres.flags).toContain('below-lod');
    expect(twoMetres.detectionLimit!.value).toBeCloseTo(calibration.cls!.detectionLimits.CO!, 12);
    expect(oneMetre.detectionLimit!.value).toBeCloseTo(2 * calibration.cls!.detectionLimits.CO!, 9);
  });

  it('refuses a scan that does not cover the regions, naming the scan and the region', () => {
    const error = thrown(() => quantifyClsScan(calibration, scan({ CO: 60 }, 95, { range: [2000, 2085] })));
    expect(isBandwrightError(error, 'WINDOW')).toBe(true);
    expect(error.message).toMatch(
      /scan-95: covers 2000–2085 cm⁻¹, which does not contain the calibration's region 1992–2025 cm⁻¹/,
    );
  });

  it('water far above its standards: poor-fit, with the out-of-range interferent named as the likely cause', () => {
    const result = quantifyClsScan(calibration, scan({ CO: 60, H2O: 320000 }, 96));
    const co = result.gases[0]!;
    expect(co.flags).toContain('poor-fit');
    expect(co.notes.join('\n')).toMatch(
      /the fit leaves a residual [\d.]+× the calibration's \(limit [\d.]+\): H2O outside the standards' range/,
    );
    expect(result.warnings.map((w) => `${w.code}: ${w.message}`).join('\n')).toMatch(
      /interferent: interferent H2O modelled at [\d.]+ % \(not reported\), outside the standards' 0–20(\.\d+)? %/,
    );
  });
});
