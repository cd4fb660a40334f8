/**
 * Coverage of CLS prediction intervals by Monte Carlo (synthetic, known truth).
 *
 * Each repeat draws new noise for every standard and for the sample, fits a new model and checks
 * whether the 95 % interval of each gas covers the truth, so the coverage measured is that of the
 * whole procedure (calibration noise included), which is what a prediction interval promises.
 * With R repeats the binomial standard deviation of a 95 % coverage is sqrt(0.95·0.05/R): 1.1 %
 * at R = 400, so 92–98 % is about ±2.7 SD.
 */
import { describe, expect, it } from 'vitest';
import { fitCls, predictCls } from '../../../src/models/cls/spectral.js';
import { fitClsCore } from '../../../src/models/cls/fit-core.js';
import { predictClsState } from '../../../src/models/cls/predict.js';
import { prepareClsState } from '../../../src/models/cls/prediction-state.js';
import { channelSegments, nuisanceBasis } from '../../../src/models/cls/basis.js';
import {
  correlatedNoise,
  mixtureDesign,
  normalGenerator,
  overlappingMixture,
  plus,
  withLinearBaseline,
} from '../../helpers/synthetic-bands.js';

const scenario = overlappingMixture();
const { grid } = scenario;
const channelCount = grid.length;
const concentrations = mixtureDesign(10);
const truth = [80, 40, 3000];
const components = scenario.components.map((component) => ({ ...component, reported: true }));

function measure(options: { seed: number; repeats: number; halfWidth: number; rms: number }): {
  coverage: number[];
  inflated: number;
} {
  const normal = normalGenerator(options.seed);
  const noisy = (c: readonly number[]): Float64Array =>
    plus(
      withLinearBaseline(scenario.spectrumOf(c), grid, 0.01 * normal(), 1e-5 * normal()),
      correlatedNoise(channelCount, { rms: options.rms, halfWidth: options.halfWidth, normal }),
    );
  const covered = [0, 0, 0];
  let inflated = 0;
  for (let repeat = 0; repeat < options.repeats; repeat++) {
    const model = fitCls(
      {
        channels: grid,
        spectra: concentrations.map(noisy),
        concentrations,
        phi: concentrations.map(() => 1),
        components,
      },
      { baselineOrder: 1 },
    );
    if (model.crossValidation.inflation.some((factor) => factor > 1)) inflated++;
    const result = predictCls(model, noisy(truth), { phi: 1 });
    result.estimates.forEach((estimate, j) => {
      if (estimate.low <= truth[j]! && truth[j]! <= estimate.high) covered[j]!++;
    });
  }
  return { coverage: covered.map((count) => count / options.repeats), inflated };
}

describe('prediction-interval coverage (Monte Carlo, synthetic, known truth)', () => {
  it('correlated noise (white noise smoothed over 7 channels, as apodisation and resampling do): 95 % intervals cover 92–98 % per gas', () => {
    const { coverage, inflated } = measure({ seed: 2024, repeats: 400, halfWidth: 3, rms: 2e-3 });
    coverage.forEach((value, j) => {
      expect(
        value,
        `${components[j]!.name}: coverage ${value} over 400 repeats (models inflated by cross-validation: ${inflated})`,
      ).toBeGreaterThanOrEqual(0.92);
      expect(value, `${components[j]!.name}: coverage ${value}`).toBeLessThanOrEqual(0.98);
    });
  });

  it('white noise: 95 % intervals cover 92–98 % per gas', () => {
    const { coverage } = measure({ seed: 77, repeats: 300, halfWidth: 0, rms: 2e-3 });
    coverage.forEach((value, j) => {
      expect(value, `${components[j]!.name}: coverage ${value} over 300 repeats`).toBeGreaterThanOrEqual(
        0.92,
      );
      expect(value, `${components[j]!.name}: coverage ${value}`).toBeLessThanOrEqual(0.98);
    });
  });

  it('the textbook interval that treats channels as independent under-covers on the same correlated noise (why the correction exists)', () => {
    const normal = normalGenerator(2024);
    const regionOf = new Float64Array(channelCount);
    const nuisance = nuisanceBasis({ positions: grid, regionOf, order: 1 });
    const segments = channelSegments(regionOf, grid);
    const noisy = (c: readonly number[]): Float64Array =>
      plus(
        withLinearBaseline(scenario.spectrumOf(c), grid, 0.01 * normal(), 1e-5 * normal()),
        correlatedNoise(channelCount, { rms: 2e-3, halfWidth: 3, normal }),
      );
    const covered = [0, 0, 0];
    const repeats = 200;
    for (let repeat = 0; repeat < repeats; repeat++) {
      const core = fitClsCore(
        {
          responses: concentrations.map(noisy),
          concentrations,
          phi: concentrations.map(() => 1),
          components,
        },
        {
          level: 0.95,
          conditionLimit: 1e3,
          secondOrder: [],
          nuisance,
          segments,
          estimateCorrelation: false,
          localResidualWeights: false,
          channelWord: 'channel',
        },
      );
      const textbook = {
        ...core,
        crossValidation: { ...core.crossValidation, inflation: components.map(() => 1) },
      };
      const result = predictClsState(textbook, prepareClsState(textbook, nuisance), noisy(truth), {
        phi: 1,
        level: 0.95,
        poorFitRatio: 1.5,
        channelWord: 'channel',
      });
      result.estimates.forEach((estimate, j) => {
        if (estimate.low <= truth[j]! && truth[j]! <= estimate.high) covered[j]!++;
      });
    }
    covered.forEach((count, j) => {
      expect(count / repeats, `${components[j]!.name}: textbook coverage ${count / repeats}`).toBeLessThan(
        0.85,
      );
    });
  });
});
