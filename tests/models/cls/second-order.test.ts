/**
 * Second-order CLS for saturating bands.
 *
 * Why it is needed (DESIGN §3, common practice): the instrument line shape acts on
 * transmittance, so when lines are narrower than the resolution the apparent absorbance grows
 * less than linearly with the column amount, and a linear K-matrix fitted over a wide range is
 * biased. The second-order option adds a u² term per chosen gas (nonlinear CLS with
 * polynomial concentration terms, as in Haaland's extensions of the K-matrix method — from
 * memory) and solves for concentration by Gauss–Newton.
 *
 * Data: (1) an exactly quadratic synthetic model (synthetic, known truth); (2) the project's
 * line-by-line simulator (`src/simulate/`, CO lines from molecular constants, Voigt profiles,
 * triangular apodisation) for real saturation (synthetic, known truth).
 */
import { describe, expect, it } from 'vitest';
import { fitCls, predictCls, type ClsData } from '../../../src/models/cls/spectral.js';
import { simulateSpectrum } from '../../../src/simulate/index.js';
import {
  correlatedNoise,
  gaussianBand,
  lorentzianBand,
  normalGenerator,
  plus,
  uniformGrid,
} from '../../helpers/synthetic-bands.js';

describe('second-order terms on an exactly quadratic response (synthetic, known truth)', () => {
  const grid = uniformGrid(1000, 1100, 0.5);
  const linear = lorentzianBand(grid, { centre: 1050, hwhm: 6, peak: 2e-3 });
  const quadratic = lorentzianBand(grid, { centre: 1050, hwhm: 3, peak: -2e-6 });
  const interferent = gaussianBand(grid, { centre: 1070, hwhm: 8, peak: 2e-2 });
  const spectrumOf = (c: readonly number[], phi = 1): Float64Array =>
    Float64Array.from(grid, (_, j) => {
      const u = c[0]! * phi;
      return linear[j]! * u + quadratic[j]! * u * u + interferent[j]! * c[1]! * phi;
    });
  const concentrations = [0, 50, 100, 150, 200, 250, 300, 350].map((c, i) => [
    c,
    [0, 3, 1, 4, 2, 5, 3, 1][i]!,
  ]);
  const components = [
    { name: 'SO2', reported: true, unit: 'ppm' },
    { name: 'H2O', reported: false, unit: 'pct' },
  ];

  it('fit-then-predict on noise-free standards returns the truth, also at φ ≠ 1', () => {
    const phi = concentrations.map((_, i) => [1, 0.9, 1.1][i % 3]!);
    const data: ClsData = {
      channels: grid,
      spectra: concentrations.map((c, i) => spectrumOf(c, phi[i])),
      concentrations,
      phi,
      components,
    };
    const model = fitCls(data, { secondOrder: ['SO2'] });
    expect(model.terms).toEqual([
      { component: 0, power: 1 },
      { component: 1, power: 1 },
      { component: 0, power: 2 },
    ]);
    for (const [c, samplePhi] of [
      [[20, 1], 1],
      [[180, 4], 1],
      [[320, 2.5], 1.2],
    ] as const) {
      const result = predictCls(model, spectrumOf(c, samplePhi), { phi: samplePhi });
      expect(
        Math.abs(result.estimates[0]!.value - c[0]),
        `SO2 truth ${c[0]}, got ${result.estimates[0]!.value}`,
      ).toBeLessThanOrEqual(1e-7 * 350);
      expect(
        Math.abs(result.interferents[0]!.value - c[1]),
        `H2O truth ${c[1]}, got ${result.interferents[0]!.value}`,
      ).toBeLessThanOrEqual(1e-7 * 5);
      expect(result.iterations).toBeGreaterThan(0);
    }
  });

  it('the linear model on the same standards is biased (the curvature is real)', () => {
    const data: ClsData = {
      channels: grid,
      spectra: concentrations.map((c) => spectrumOf(c)),
      concentrations,
      phi: concentrations.map(() => 1),
      components,
    };
    const model = fitCls(data);
    const result = predictCls(model, spectrumOf([50, 1]), { phi: 1 });
    expect(Math.abs(result.estimates[0]!.value / 50 - 1)).toBeGreaterThan(0.02);
  });
});

describe('saturating CO lines from the line-by-line simulator (synthetic, known truth)', () => {
  // Method: the weaker high-J lines of both branches, 2030–2060 and 2220–2250 cm⁻¹, as two
  // regions with their own linear baseline; 1 cm⁻¹ resolution, 1 m cell, 296 K, 101.325 kPa;
  // standards 0–3000 ppm (ppm·m at 1 m) in nine levels with 5e-4 AU noise from the simulator.
  const simulate = (ppm: number, seed: number, noise: number): Float64Array =>
    simulateSpectrum({
      gases: [{ name: 'CO', ppm }],
      pathLength_m: 1,
      range_cm: [2020, 2260],
      resolution_cm: 1,
      noiseRms_AU: noise,
      seed,
    }).spectrum.y;
  const x = simulateSpectrum({
    gases: [{ name: 'CO', ppm: 0 }],
    pathLength_m: 1,
    range_cm: [2020, 2260],
    resolution_cm: 1,
  }).spectrum.x;
  const picked: number[] = [];
  const regionOf: number[] = [];
  x.forEach((wavenumber, j) => {
    if (wavenumber >= 2030 && wavenumber <= 2060) {
      picked.push(j);
      regionOf.push(0);
    } else if (wavenumber >= 2220 && wavenumber <= 2250) {
      picked.push(j);
      regionOf.push(1);
    }
  });
  const pick = (y: Float64Array): Float64Array => Float64Array.from(picked, (j) => y[j]!);
  const grid = pick(x);
  const levels = [0, 375, 750, 1125, 1500, 1875, 2250, 2625, 3000];
  const standards = levels.map((ppm, i) => pick(simulate(ppm, 100 + i, 5e-4)));
  const data: ClsData = {
    channels: grid,
    regionOf,
    spectra: standards,
    concentrations: levels.map((ppm) => [ppm]),
    phi: levels.map(() => 1),
    components: [{ name: 'CO', reported: true, unit: 'ppm' }],
  };
  const linearModel = fitCls(data, { baselineOrder: 1 });
  const secondOrderModel = fitCls(data, { baselineOrder: 1, secondOrder: ['CO'] });
  const samples = [150, 300, 900, 1500, 2100, 2700];
  const bias = (model: typeof linearModel): number[] =>
    samples.map(
      (ppm) => predictCls(model, pick(simulate(ppm, 1, 0)), { phi: 1 }).estimates[0]!.value / ppm - 1,
    );

  it('the linear model is biased by more than 8 % somewhere in 0–3000 ppm·m; the second-order model stays within 1.5 % everywhere', () => {
    const linearBias = bias(linearModel);
    const secondOrderBias = bias(secondOrderModel);
    const table = samples
      .map(
        (ppm, k) =>
          `${ppm} ppm: linear ${(100 * linearBias[k]!).toFixed(2)} %, second-order ${(100 * secondOrderBias[k]!).toFixed(2)} %`,
      )
      .join('; ');
    expect(Math.max(...linearBias.map(Math.abs)), table).toBeGreaterThan(0.08);
    for (const value of secondOrderBias) expect(Math.abs(value), table).toBeLessThanOrEqual(0.015);
  });

  it('cross-validation sees the linear model’s lack of fit and widens its intervals; not the second-order model’s', () => {
    expect(linearModel.crossValidation.inflation[0]).toBeGreaterThan(2);
    expect(secondOrderModel.crossValidation.inflation[0]).toBe(1);
    expect(secondOrderModel.crossValidation.rmsecv[0]!).toBeLessThan(
      linearModel.crossValidation.rmsecv[0]! / 3,
    );
  });

  it('delta-method intervals of the second-order model cover 92–98 % (200 repeats, correlated noise added to simulated spectra)', () => {
    const clean = levels.map((ppm) => pick(simulate(ppm, 1, 0)));
    const truths = [300, 1200, 2400];
    const sampleClean = truths.map((ppm) => pick(simulate(ppm, 1, 0)));
    const normal = normalGenerator(5);
    const covered = truths.map(() => 0);
    const repeats = 200;
    for (let repeat = 0; repeat < repeats; repeat++) {
      const model = fitCls(
        {
          ...data,
          spectra: clean.map((spectrum) =>
            plus(spectrum, correlatedNoise(spectrum.length, { rms: 1e-3, halfWidth: 2, normal })),
          ),
        },
        { baselineOrder: 1, secondOrder: ['CO'] },
      );
      truths.forEach((ppm, k) => {
        const estimate = predictCls(
          model,
          plus(sampleClean[k]!, correlatedNoise(grid.length, { rms: 1e-3, halfWidth: 2, normal })),
          { phi: 1 },
        ).estimates[0]!;
        if (estimate.low <= ppm && ppm <= estimate.high) covered[k]!++;
      });
    }
    covered.forEach((count, k) => {
      expect(count / repeats, `CO ${truths[k]} ppm: coverage ${count / repeats}`).toBeGreaterThanOrEqual(
        0.92,
      );
      expect(count / repeats, `CO ${truths[k]} ppm: coverage ${count / repeats}`).toBeLessThanOrEqual(0.98);
    });
  });
});
