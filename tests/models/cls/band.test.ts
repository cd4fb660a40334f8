/**
 * Band-area CLS (synthetic, known truth): five bands, two reported gases and an interferent,
 * every band shared by at least two of them. Band responses per ppm are invented; areas are
 * K-matrix mixtures with independent Gaussian noise per band.
 */
import { describe, expect, it } from 'vitest';
import {
  fitBandCls,
  predictBandCls,
  type BandClsData,
  type BandClsModel,
} from '../../../src/models/cls/band.js';
import { isBandwrightError } from '../../../src/errors.js';
import { mixtureDesign, normalGenerator } from '../../helpers/synthetic-bands.js';

const bands = ['1850-1950', '1580-1640', '2880-2930', '1340-1380', '2190-2240'];
// AU·cm⁻¹ per ppm; rows NO, NO2, H2O.
const response = [
  [0.02, 0.012, 0.003, 0, 0.008],
  [0.005, 0.015, 0.018, 0.004, 0],
  [0, 1e-4, 2e-4, 3e-4, 1e-4],
];
const components = [
  { name: 'NO', reported: true, unit: 'ppm' },
  { name: 'NO2', reported: true, unit: 'ppm' },
  { name: 'H2O', reported: false, unit: 'ppm' },
];
const areasOf = (c: readonly number[], phi = 1): Float64Array =>
  Float64Array.from(bands, (_, k) => phi * response.reduce((sum, row, j) => sum + row[k]! * c[j]!, 0));

function standards(options: { seed: number; rms: number }): BandClsData {
  const normal = normalGenerator(options.seed);
  const concentrations = mixtureDesign(10);
  return {
    bands,
    areas: concentrations.map((c) => areasOf(c).map((value) => value + options.rms * normal())),
    concentrations,
    phi: concentrations.map(() => 1),
    components,
  };
}

function expectSingular(action: () => unknown, names: readonly string[]): void {
  try {
    action();
  } catch (error) {
    expect(isBandwrightError(error, 'SINGULAR'), String(error)).toBe(true);
    for (const name of names) expect((error as Error).message).toContain(name);
    return;
  }
  throw new Error('expected a SINGULAR error');
}

describe('fitBandCls / predictBandCls', () => {
  it('recovers each gas within 2 % (or 0.5 ppm) with shared bands and an interferent', () => {
    const model = fitBandCls(standards({ seed: 1, rms: 0.01 }));
    const normal = normalGenerator(2);
    for (const truth of [
      [80, 40, 3000],
      [150, 10, 4500],
      [20, 90, 2500],
    ]) {
      const result = predictBandCls(
        model,
        areasOf(truth).map((value) => value + 0.01 * normal()),
        { phi: 1 },
      );
      expect(result.estimates.map((e) => e.name)).toEqual(['NO', 'NO2']);
      result.estimates.forEach((estimate, j) => {
        const tolerance = Math.max(0.02 * truth[j]!, 0.5);
        expect(
          Math.abs(estimate.value - truth[j]!),
          `${estimate.name}: truth ${truth[j]}, got ${estimate.value}, tolerance ${tolerance}`,
        ).toBeLessThanOrEqual(tolerance);
      });
      expect(result.residual.length).toBe(5);
    }
  });

  it('noise-free standards: fit-then-predict returns the truth, and φ scales the result', () => {
    const model = fitBandCls(standards({ seed: 1, rms: 0 }));
    const truth = [33, 77, 4100];
    const result = predictBandCls(model, areasOf(truth, 1.6), { phi: 1.6 });
    [...result.estimates, ...result.interferents].forEach((estimate, j) => {
      expect(Math.abs(estimate.value - truth[j]!), estimate.name).toBeLessThanOrEqual(1e-9 * truth[j]!);
    });
  });

  it('95 % intervals cover 92–98 % per gas (400 Monte Carlo repeats, new standards and sample each time)', () => {
    const normal = normalGenerator(31);
    const truth = [80, 40, 3000];
    const covered = [0, 0];
    const repeats = 400;
    const concentrations = mixtureDesign(10);
    for (let repeat = 0; repeat < repeats; repeat++) {
      const model = fitBandCls({
        bands,
        areas: concentrations.map((c) => areasOf(c).map((value) => value + 0.01 * normal())),
        concentrations,
        phi: concentrations.map(() => 1),
        components,
      });
      const result = predictBandCls(
        model,
        areasOf(truth).map((value) => value + 0.01 * normal()),
        { phi: 1 },
      );
      result.estimates.forEach((estimate, j) => {
        if (estimate.low <= truth[j]! && truth[j]! <= estimate.high) covered[j]!++;
      });
    }
    covered.forEach((count, j) => {
      expect(count / repeats, `${components[j]!.name}: coverage ${count / repeats}`).toBeGreaterThanOrEqual(
        0.92,
      );
      expect(count / repeats, `${components[j]!.name}: coverage ${count / repeats}`).toBeLessThanOrEqual(
        0.98,
      );
    });
  });

  it('an absorber missing from the method (extra area in one band) is flagged poor-fit; a clean sample is not', () => {
    const model = fitBandCls(standards({ seed: 4, rms: 0.01 }));
    const normal = normalGenerator(5);
    const clean = areasOf([80, 40, 3000]).map((value) => value + 0.01 * normal());
    expect(predictBandCls(model, clean, { phi: 1 }).flags).toEqual([]);
    const contaminated = clean.map((value, k) => (k === 3 ? value + 0.5 : value));
    const result = predictBandCls(model, contaminated, { phi: 1 });
    expect(result.flags, `fit ratio ${result.fitRatio}, limit ${result.fitRatioLimit}`).toEqual(['poor-fit']);
  });

  it('refuses collinear standards (NO and NO2 always 1:1) naming both gases', () => {
    const data = standards({ seed: 6, rms: 0.01 });
    const concentrations = data.concentrations.map((c) => [c[0]!, c[0]!, c[2]!]);
    expectSingular(() => fitBandCls({ ...data, concentrations }), ['NO', 'NO2']);
  });

  it('refuses gases whose band responses are proportional (coinciding bands) naming both', () => {
    const concentrations = mixtureDesign(10);
    const proportional = [response[0]!, response[0]!.map((v) => 0.5 * v), response[2]!];
    const areas = concentrations.map((c) =>
      Float64Array.from(bands, (_, k) => proportional.reduce((sum, row, j) => sum + row[k]! * c[j]!, 0)),
    );
    expectSingular(
      () => fitBandCls({ bands, areas, concentrations, phi: concentrations.map(() => 1), components }),
      ['NO', 'NO2'],
    );
  });

  it('needs more bands than gases, and names the rule', () => {
    const data = standards({ seed: 7, rms: 0.01 });
    const three = {
      ...data,
      bands: bands.slice(0, 3),
      areas: data.areas.map((row) => Array.from(row).slice(0, 3)),
    };
    expect(() => fitBandCls(three)).toThrow(
      /3 band\(s\) for 3 model term\(s\): band-area CLS needs more bands than gases/,
    );
    expect(() => fitBandCls({ ...data, bands: [bands[0]!, bands[0]!, ...bands.slice(2)] })).toThrow(
      /bands\[1\] = "1850-1950" appears twice/,
    );
    expect(() =>
      fitBandCls({
        ...data,
        areas: data.areas.map((row, i) =>
          i === 2 ? Array.from(row).map((v, k) => (k === 1 ? Number.NaN : v)) : row,
        ),
      }),
    ).toThrow(/areas\[2\] \(standard 3\) band 1 = NaN, must be a finite number/);
  });

  it('is plain JSON, and neither function modifies its inputs', () => {
    const data = standards({ seed: 8, rms: 0.01 });
    const snapshot = JSON.stringify({ ...data, areas: data.areas.map((row) => Array.from(row)) });
    const model = fitBandCls(data, { secondOrder: ['NO2'] });
    expect(JSON.stringify({ ...data, areas: data.areas.map((row) => Array.from(row)) })).toBe(snapshot);
    const copy = JSON.parse(JSON.stringify(model)) as BandClsModel;
    expect(copy).toEqual(model);
    const sample = areasOf([50, 50, 3000]);
    const before = Array.from(sample);
    const modelBefore = JSON.stringify(model);
    const a = predictBandCls(model, sample, { phi: 1 });
    const b = predictBandCls(copy, sample, { phi: 1 });
    expect(b.estimates).toEqual(a.estimates);
    expect(Array.from(sample)).toEqual(before);
    expect(JSON.stringify(model)).toBe(modelBefore);
  });
});
