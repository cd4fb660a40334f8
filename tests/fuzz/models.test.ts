/**
 * Fuzzing the models: univariate fit and inverse prediction, and spectral CLS fit and
 * prediction, on arbitrary standards (near-valid data with hostile values mixed in: NaN,
 * infinities, huge and negative numbers, too few levels, collinear components). Every case fits
 * and predicts finite numbers, or throws a BandwrightError with a code: a concentration is never
 * NaN or infinite without an error (the one allowed non-finite end is a Fieller interval reported
 * unbounded, as null).
 */
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import type { ClsPrediction } from '../../src/models/cls/model.js';
import { fitCls, predictCls, type ClsModel } from '../../src/models/cls/spectral.js';
import { fitUnivariate } from '../../src/models/univariate/fit.js';
import type { UnivariateModel } from '../../src/models/univariate/model.js';
import { predictUnivariate } from '../../src/models/univariate/predict.js';
import { FUZZ_PARAMETERS, FUZZ_RUNS, FUZZ_SEED, FuzzTally, allFinite, invariant } from './harness.js';

const summaries: string[] = [];
afterAll(() => summaries.forEach((line) => console.log(line)));

const hostileNumber = fc.constantFrom(
  Number.NaN,
  Number.POSITIVE_INFINITY,
  Number.NEGATIVE_INFINITY,
  1e308,
  -1e308,
  1e200,
  -1,
  -0,
  0,
  5e-324,
);
const level = fc.oneof(
  { weight: 5, arbitrary: fc.constantFrom(0.95, 0.99, 0.9) },
  { weight: 1, arbitrary: fc.oneof(fc.double({ min: -1, max: 2 }), hostileNumber) },
);

/** Standards near a curve (invented, only safety is tested), some values replaced by hostile ones. */
const univariateData = fc
  .record({
    levels: fc
      .array(fc.constantFrom(0, 0.5, 1, 2, 5, 10, 50, 100, 400, 1e6), { minLength: 0, maxLength: 8 })
      .map((l) => (l.length > 1 && l.length < 4 ? [...l, 0, 1, 2] : l)),
    slope: fc.oneof(fc.double({ min: -5, max: 5, noNaN: true }), fc.constantFrom(0, 1e-300, 1e300)),
    curvature: fc.oneof(fc.constant(0), fc.double({ min: -0.01, max: 0.01, noNaN: true })),
    noise: fc.array(fc.double({ min: -0.05, max: 0.05, noNaN: true }), { minLength: 8, maxLength: 8 }),
    hostile: fc.oneof(
      { weight: 3, arbitrary: fc.constant([] as [number, number][]) },
      {
        weight: 1,
        arbitrary: fc.array(fc.tuple(fc.integer({ min: 0, max: 15 }), hostileNumber), {
          minLength: 1,
          maxLength: 2,
        }),
      },
    ),
    extraResponse: fc.integer({ min: 0, max: 9 }).map((k) => k === 0),
  })
  .map(({ levels, slope, curvature, noise, hostile, extraResponse }) => {
    const concentration = [...levels];
    const response = levels.map((x, i) => 0.01 + slope * x + curvature * x * x + (noise[i] as number));
    for (const [at, value] of hostile) {
      const target = at < 8 ? concentration : response;
      if (target.length > at % 8) target[at % 8] = value;
    }
    if (extraResponse) response.push(1);
    return { concentration, response };
  });

function checkPrediction(prediction: ReturnType<typeof predictUnivariate>): void {
  invariant(
    Number.isFinite(prediction.value) && Number.isFinite(prediction.se) && prediction.se >= 0,
    'finite value and standard error',
  );
  for (const end of [prediction.low, prediction.high])
    invariant(
      end === null ? prediction.unbounded : Number.isFinite(end),
      'finite interval ends, null only when unbounded',
    );
  if (prediction.low !== null && prediction.high !== null)
    invariant(prediction.low <= prediction.high, 'low <= high');
}

describe(`univariate model fuzz (seed ${FUZZ_SEED}, ${FUZZ_RUNS} cases)`, () => {
  it('fits and predicts finite numbers, or throws a BandwrightError with a code', () => {
    const tally = new FuzzTally('univariate fit + predict');
    fc.assert(
      fc.property(
        univariateData,
        fc.constantFrom('linear', 'origin', 'quadratic'),
        fc.constantFrom('none', 'none', '1/x', '1/x2', 'replicates'),
        fc.oneof(
          {
            weight: 5,
            arbitrary: fc.array(fc.double({ min: -50, max: 50, noNaN: true }), {
              minLength: 1,
              maxLength: 3,
            }),
          },
          { weight: 1, arbitrary: fc.array(fc.oneof(fc.double(), hostileNumber), { maxLength: 3 }) },
        ),
        level,
        fc.constantFrom('standard', 'fieller'),
        (data, form, weights, responses, chosenLevel, method) => {
          tally.attempt(() => {
            const model: UnivariateModel = fitUnivariate(data, {
              form: form,
              weights: weights,
            });
            invariant(
              allFinite([
                model.coefficients.a,
                model.coefficients.b,
                model.coefficients.c,
                model.residualSD,
              ]) && model.degreesOfFreedom >= 1,
              'fitted numbers finite',
            );
            return predictUnivariate(model, responses, {
              level: chosenLevel,
              method: method,
            });
          }, checkPrediction);
        },
      ),
      FUZZ_PARAMETERS,
    );
    summaries.push(tally.summary());
    expect(tally.total).toBe(FUZZ_RUNS);
    expect(tally.accepted).toBeGreaterThan(FUZZ_RUNS / 20);
  });
});

/** Mixture standards on a few channels: Gaussian pure spectra (invented) times concentrations, plus noise and hostile values. */
const clsCase = fc
  .record({
    channels: fc.integer({ min: 3, max: 14 }),
    components: fc.integer({ min: 1, max: 2 }),
    standards: fc.integer({ min: 1, max: 6 }),
    centres: fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 2, maxLength: 2 }),
    levels: fc.array(fc.constantFrom(0, 1, 2, 5, 10, 20), { minLength: 12, maxLength: 12 }),
    noise: fc.array(fc.double({ min: -1e-3, max: 1e-3, noNaN: true }), { minLength: 84, maxLength: 84 }),
    hostile: fc.array(
      fc.tuple(fc.constantFrom('spectrum', 'concentration', 'phi', 'sample'), fc.nat(100), hostileNumber),
      { maxLength: 2 },
    ),
    baselineOrder: fc.oneof(fc.integer({ min: 0, max: 2 }), fc.constantFrom(-1, 4, 1.5)),
    secondOrder: fc.boolean(),
    phi: fc.double({ min: 0.5, max: 2, noNaN: true }),
    sampleScale: fc.oneof(fc.double({ min: 0, max: 30, noNaN: true }), fc.constantFrom(1e6, -10)),
  })
  .map((c) => {
    const pure = (k: number, j: number): number =>
      Math.exp(-0.5 * ((j / Math.max(1, c.channels - 1) - (c.centres[k] as number)) / 0.2) ** 2);
    const concentrations = Array.from({ length: c.standards }, (_, i) =>
      Array.from({ length: c.components }, (_, k) => c.levels[(i * 2 + k) % 12] as number),
    );
    const spectra = concentrations.map((row, i) =>
      Array.from(
        { length: c.channels },
        (_, j) => row.reduce((sum, x, k) => sum + x * pure(k, j), 0) + (c.noise[(i * 14 + j) % 84] as number),
      ),
    );
    const phi = concentrations.map(() => 1);
    const sample = Array.from(
      { length: c.channels },
      (_, j) => c.sampleScale * pure(0, j) + (c.noise[j] as number),
    );
    for (const [where, at, value] of c.hostile) {
      if (where === 'spectrum' && spectra.length > 0)
        (spectra[at % spectra.length] as number[])[at % c.channels] = value;
      if (where === 'concentration' && concentrations.length > 0)
        (concentrations[at % concentrations.length] as number[])[at % c.components] = value;
      if (where === 'phi' && phi.length > 0) phi[at % phi.length] = value;
      if (where === 'sample') sample[at % c.channels] = value;
    }
    const components = Array.from({ length: c.components }, (_, k) => ({
      name: k === 0 ? 'CO' : 'N2O',
      reported: true,
      unit: 'ppm',
    }));
    return {
      data: { channels: c.channels, spectra, concentrations, phi, components },
      options: { baselineOrder: c.baselineOrder, ...(c.secondOrder ? { secondOrder: ['CO'] } : {}) },
      sample,
      phi: c.phi,
    };
  });

function checkCls(prediction: ClsPrediction, sample: readonly number[]): void {
  for (const e of [...prediction.estimates, ...prediction.interferents]) {
    invariant(
      Number.isFinite(e.value) &&
        Number.isFinite(e.se) &&
        e.se >= 0 &&
        Number.isFinite(e.low) &&
        Number.isFinite(e.high) &&
        e.low <= e.high,
      `${e.name}: finite value, se and interval`,
    );
  }
  // A NaN sample channel (saturated) is left out of the fit: the residual is NaN there and only there.
  const definedResidual = Array.from(prediction.residual).filter((_, j) => !Number.isNaN(sample[j]));
  const leftOut = Array.from(prediction.residual).filter((_, j) => Number.isNaN(sample[j]));
  invariant(
    Number.isFinite(prediction.residualRms) &&
      allFinite(definedResidual) &&
      leftOut.every((value) => Number.isNaN(value)),
    'finite residual where the sample is defined, NaN where it is not',
  );
}

describe(`CLS model fuzz (seed ${FUZZ_SEED}, ${FUZZ_RUNS} cases)`, () => {
  it('fits and predicts finite numbers, or throws a BandwrightError with a code', () => {
    const tally = new FuzzTally('CLS fit + predict');
    fc.assert(
      fc.property(clsCase, level, (c, chosenLevel) => {
        tally.attempt(
          () => {
            const model: ClsModel = fitCls(c.data, c.options);
            return predictCls(model, c.sample, { phi: c.phi, level: chosenLevel });
          },
          (prediction) => checkCls(prediction, c.sample),
        );
      }),
      FUZZ_PARAMETERS,
    );
    summaries.push(tally.summary());
    expect(tally.total).toBe(FUZZ_RUNS);
    expect(tally.accepted).toBeGreaterThan(FUZZ_RUNS / 50);
  });
});
