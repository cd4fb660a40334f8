import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { PolynomialRegression } from 'ml-regression-polynomial';
import { SimpleLinearRegression } from 'ml-regression-simple-linear';
import { describe, expect, it } from 'vitest';
import { fitUnivariate } from '../../src/models/univariate/fit.js';
import type { CurveForm, UnivariateModel, WeightScheme } from '../../src/models/univariate/model.js';
import { predictUnivariate } from '../../src/models/univariate/predict.js';
import { fittedCurveWithBands } from '../../src/models/univariate/curve-bands.js';
import { weightAt } from '../../src/models/univariate/weights.js';
import { createRandom } from '../../src/simulate/random.js';
import { leastSquares } from '../../src/stats/least-squares.js';
import { expectAbsolute, expectRelative, loadDataset } from '../fixtures/nist-strd/nist.js';
import { expectError } from '../helpers/expect.js';

// Source: DIN 32645 worked example (tests/fixtures/din32645/worked-example.json).
const din = JSON.parse(
  readFileSync(new URL('../fixtures/din32645/worked-example.json', import.meta.url), 'utf8'),
) as {
  data: { concentration: number[]; response: number[] };
  printed: {
    slope: number;
    intercept: number;
    residualSD: number;
    methodSD: number;
    inverseAt3500: { response: number; concentration: number };
    predictionHalfWidthAt3500: { halfWidth: number };
    decisionLimit: { value: number };
    detectionLimit: { value: number };
    determinationLimit: { value: number };
    mandel: { testValue: number };
  };
};

/** Seeded uniform generator (mulberry32) and Box–Muller normal deviates, for reproducible noise. */
function seededNormal(seed: number): { uniform: () => number; normal: () => number } {
  // The project's mulberry32 generator; the Box–Muller pairing below is this helper's own.
  const uniform = createRandom(seed);
  const normal = (): number => {
    let u = 0;
    while (u === 0) u = uniform();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * uniform());
  };
  return { uniform, normal };
}

function deepFreeze<T>(value: T): T {
  if (value !== null && typeof value === 'object') {
    Object.values(value as Record<string, unknown>).forEach((inner) => deepFreeze(inner));
    Object.freeze(value);
  }
  return value;
}

function nist(name: 'norris' | 'noint1' | 'noint2' | 'pontius'): {
  concentration: number[];
  response: number[];
} {
  const { x, y } = loadDataset(name);
  return { concentration: x.map((row) => row[0] as number), response: y };
}

describe('fitUnivariate against NIST StRD', () => {
  // Source: NIST StRD, Norris. Tolerance 1e-9 relative.
  it('Norris as a straight-line calibration', () => {
    const { certified } = loadDataset('norris');
    const model = fitUnivariate(nist('norris'), { form: 'linear' });
    expectRelative(model.coefficients.a, certified.B[0] as number, 1e-9, 'Norris a');
    expectRelative(model.coefficients.b, certified.B[1] as number, 1e-9, 'Norris b');
    expectRelative(model.standardErrors.a, certified.SE[0] as number, 1e-9, 'Norris SE(a)');
    expectRelative(model.standardErrors.b, certified.SE[1] as number, 1e-9, 'Norris SE(b)');
    expectRelative(model.residualSD, certified.residualSD, 1e-9, 'Norris s');
    expectRelative(model.rSquared, certified.R2, 1e-9, 'Norris R²');
    expect(model.degreesOfFreedom).toBe(certified.dfResidual);
    expect(model.coefficients.c).toBe(0);
  });

  // Source: NIST StRD, NoInt1 and NoInt2 (R² uncentred as NIST certifies it). 1e-9 relative.
  for (const name of ['noint1', 'noint2'] as const) {
    it(`${name} as a through-origin calibration`, () => {
      const { certified } = loadDataset(name);
      const model = fitUnivariate(nist(name), { form: 'origin' });
      expectRelative(model.coefficients.b, certified.B[0] as number, 1e-9, `${name} b`);
      expectRelative(model.standardErrors.b, certified.SE[0] as number, 1e-9, `${name} SE(b)`);
      expectRelative(model.residualSD, certified.residualSD, 1e-9, `${name} s`);
      expectRelative(model.rSquared, certified.R2, 1e-9, `${name} R²`);
      expect(model.rSquaredKind).toBe('uncentred');
      expect(model.degreesOfFreedom).toBe(certified.dfResidual);
      expect(model.coefficients.a).toBe(0);
    });
  }

  // Source: NIST StRD, Pontius (x to 3e6). Tolerance 1e-7 relative.
  it('Pontius as a second-order calibration, coefficients in original units', () => {
    const { certified } = loadDataset('pontius');
    const model = fitUnivariate(nist('pontius'), { form: 'quadratic' });
    const names = ['a', 'b', 'c'] as const;
    names.forEach((key, j) => {
      expectRelative(model.coefficients[key], certified.B[j] as number, 1e-7, `Pontius ${key}`);
      expectRelative(model.standardErrors[key], certified.SE[j] as number, 1e-7, `Pontius SE(${key})`);
    });
    expectRelative(model.residualSD, certified.residualSD, 1e-7, 'Pontius s');
    expectRelative(model.rSquared, certified.R2, 1e-7, 'Pontius R²');
    expect(model.degreesOfFreedom).toBe(certified.dfResidual);
    // Covariance in original units: its diagonal gives the certified standard errors.
    names.forEach((_, j) =>
      expectRelative(
        Math.sqrt((model.covariance[j] as number[])[j] as number),
        certified.SE[j] as number,
        1e-7,
        `Pontius √Cov[${j}][${j}]`,
      ),
    );
  });
});

describe('DIN 32645 worked example', () => {
  const model = fitUnivariate(din.data, { form: 'linear', alpha: 0.01 });

  it('slope, intercept, residual SD and method SD as printed', () => {
    expectAbsolute(model.coefficients.b, din.printed.slope, 5e-4, 'slope b');
    expectAbsolute(model.coefficients.a, din.printed.intercept, 5e-4, 'intercept a');
    expectAbsolute(model.residualSD, din.printed.residualSD, 5e-4, 's_y');
    expectAbsolute(model.residualSD / model.coefficients.b, din.printed.methodSD, 5e-7, 's_x0');
  });

  it('x̂ = 0.10548 at y0 = 3500 (m = 1), 99 % prediction half-width 0.07434', () => {
    const estimate = predictUnivariate(model, [din.printed.inverseAt3500.response], { level: 0.99 });
    expectAbsolute(estimate.value, din.printed.inverseAt3500.concentration, 5e-6, 'x̂');
    expectAbsolute(
      (estimate.high as number) - estimate.value,
      din.printed.predictionHalfWidthAt3500.halfWidth,
      5e-6,
      'half-width above',
    );
    expectAbsolute(
      estimate.value - (estimate.low as number),
      din.printed.predictionHalfWidthAt3500.halfWidth,
      5e-6,
      'half-width below',
    );
    expect(estimate.degreesOfFreedom).toBe(8);
    expect(estimate.m).toBe(1);
    expect(estimate.extrapolated).toBe(false);
    expect(estimate.method).toMatch(/straight-line inverse prediction/);
  });

  it('decision, detection and determination limits 0.0698, 0.14, 0.212', () => {
    expectAbsolute(model.limits.decision.value as number, din.printed.decisionLimit.value, 5e-5, 'x_C');
    expectAbsolute(model.limits.detection.value as number, din.printed.detectionLimit.value, 5e-3, 'x_D');
    expectAbsolute(
      model.limits.determination.value as number,
      din.printed.determinationLimit.value,
      5e-4,
      'x_Q',
    );
    expect(model.limits.decision.definition).toMatch(/DIN 32645/);
    expect(model.alpha).toBe(0.01);
  });

  it('Mandel test PW = 0.0768: straight line adequate', () => {
    expect(model.mandel).not.toBeNull();
    expectAbsolute(model.mandel?.testValue as number, din.printed.mandel.testValue, 5e-5, 'PW');
    expect(model.mandel?.significant).toBe(false);
    expect(model.warnings.some((w) => w.includes('Mandel'))).toBe(false);
  });
});

describe('cross-checks with independent regression libraries (well-conditioned data)', () => {
  // Source: ml-regression-simple-linear and ml-regression-polynomial (general-purpose libraries).
  it('straight line agrees with ml-regression-simple-linear', () => {
    const reference = new SimpleLinearRegression(din.data.concentration, din.data.response);
    const model = fitUnivariate(din.data, { form: 'linear' });
    expectRelative(model.coefficients.b, reference.slope, 1e-10, 'slope');
    expectRelative(model.coefficients.a, reference.intercept, 1e-10, 'intercept');
    expectRelative(
      predictUnivariate(model, [5000]).value,
      reference.computeX(5000),
      1e-10,
      'inverse at 5000',
    );
  });

  it('second order and through origin agree with ml-regression-polynomial', () => {
    const quadratic = fitUnivariate(din.data, { form: 'quadratic' });
    const reference = new PolynomialRegression(din.data.concentration, din.data.response, 2);
    expectRelative(quadratic.coefficients.a, reference.coefficients[0] as number, 1e-8, 'a');
    expectRelative(quadratic.coefficients.b, reference.coefficients[1] as number, 1e-8, 'b');
    expectRelative(quadratic.coefficients.c, reference.coefficients[2] as number, 1e-8, 'c');
    const origin = fitUnivariate(nist('noint1'), { form: 'origin' });
    const throughZero = new PolynomialRegression(nist('noint1').concentration, nist('noint1').response, 1, {
      interceptAtZero: true,
    });
    expectRelative(origin.coefficients.b, throughZero.coefficients[0] as number, 1e-10, 'origin b');
  });
});

describe('inverse prediction on noise-free data returns the truth (property, fixed seed)', () => {
  const schemes: WeightScheme[] = ['none', '1/x', '1/x2'];
  const forms: CurveForm[] = ['linear', 'origin', 'quadratic'];
  it('for every form and weighting', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...forms),
        fc.constantFrom(...schemes),
        fc.uniqueArray(fc.integer({ min: 0, max: 1000 }), { minLength: 4, maxLength: 9 }),
        fc.double({ min: 0.01, max: 100, noNaN: true }),
        fc.boolean(),
        fc.double({ min: -5, max: 5, noNaN: true }),
        fc.double({ min: -0.9, max: 0.9, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.integer({ min: 1, max: 3 }),
        (form, weights, levelList, slopeSize, negative, intercept, curvature, where, replicates) => {
          const levels = levelList.map((level) => level / 10);
          const top = Math.max(...levels);
          const bottom = Math.min(...levels);
          fc.pre(top - bottom > 1);
          const b = negative ? -slopeSize : slopeSize;
          const a = form === 'origin' ? 0 : intercept;
          // Vertex −b/(2c) = −top/curvature lies outside [0, top], so the curve is monotonic there.
          const c = form === 'quadratic' ? (curvature * b) / (2 * top) : 0;
          const truth = (x: number): number => a + b * x + c * x * x;
          const concentration = levels.flatMap((level) => Array.from({ length: replicates }, () => level));
          const model = fitUnivariate(
            { concentration, response: concentration.map(truth) },
            { form, weights },
          );
          const x0 = bottom + where * (top - bottom);
          const estimate = predictUnivariate(model, [truth(x0), truth(x0)]);
          return Math.abs(estimate.value - x0) <= 1e-8 * top && !estimate.extrapolated;
        },
      ),
      { seed: 424242, numRuns: 300 },
    );
  });
});

describe('Mandel test inside fitUnivariate', () => {
  // Source: NIST StRD, Pontius — certified quadratic; Norris — certified straight line.
  it('recommends second order for NIST Pontius fitted as a straight line', () => {
    const model = fitUnivariate(nist('pontius'), { form: 'linear' });
    expect(model.mandel?.significant).toBe(true);
    expect(model.warnings.join('\n')).toMatch(
      /Mandel test: the second-order curve fits significantly better .*use a second-order calibration/,
    );
  });

  it('does not recommend second order for NIST Norris', () => {
    const model = fitUnivariate(nist('norris'), { form: 'linear' });
    expect(model.mandel?.significant).toBe(false);
  });

  // Simulated saturating band areas (apparent absorbance grows less than linearly with
  // concentration, DESIGN §3) against a straight response, each with 1 % noise, seeded.
  it('separates simulated curved from straight responses', () => {
    const { normal } = seededNormal(31337);
    const concentration = [
      0, 50, 100, 150, 200, 250, 300, 400, 500, 0, 50, 100, 150, 200, 250, 300, 400, 500,
    ];
    const curved = concentration.map((x) => 12 * (1 - Math.exp(-x / 400)) + 0.01 * normal());
    const straight = concentration.map((x) => 0.02 * x + 0.01 * normal());
    expect(fitUnivariate({ concentration, response: curved }, { form: 'linear' }).mandel?.significant).toBe(
      true,
    );
    const straightModel = fitUnivariate({ concentration, response: straight }, { form: 'quadratic' });
    expect(straightModel.mandel?.significant).toBe(false);
    expect(straightModel.warnings.join('\n')).toMatch(/a straight line is adequate/);
  });

  it('is skipped, with a warning, when there are too few standards', () => {
    const model = fitUnivariate(
      { concentration: [0, 10, 20], response: [0.1, 1.1, 2.0] },
      { form: 'linear' },
    );
    expect(model.mandel).toBeNull();
    expect(model.warnings.join('\n')).toMatch(/Mandel test not run: it needs at least 4 standards/);
  });
});

describe('input validation', () => {
  it('refuses NaN and infinite values, naming the position', () => {
    expectError(
      () =>
        fitUnivariate({ concentration: [0, 1, Number.NaN, 3], response: [0, 1, 2, 3] }, { form: 'linear' }),
      'INVALID_VALUE',
      /concentration\[2\] = NaN, must be a finite number/,
    );
    expectError(
      () =>
        fitUnivariate(
          { concentration: [0, 1, 2, 3], response: [0, Number.POSITIVE_INFINITY, 2, 3] },
          { form: 'linear' },
        ),
      'INVALID_VALUE',
      /response\[1\] = Infinity, must be a finite number/,
    );
  });

  it('refuses all standards at one concentration', () => {
    expectError(
      () =>
        fitUnivariate(
          { concentration: [10, 10, 10, 10, 10], response: [1, 1.1, 0.9, 1, 1.05] },
          { form: 'linear' },
        ),
      'INSUFFICIENT_DATA',
      /all 5 standards are at one concentration \(10\)/,
    );
  });

  it('refuses too few distinct levels, saying how many are needed and found', () => {
    expectError(
      () => fitUnivariate({ concentration: [0, 0, 10, 10], response: [0, 0.1, 1, 1.1] }, { form: 'linear' }),
      'INSUFFICIENT_DATA',
      /needs at least 3 distinct concentration levels \(2 parameters \+ 1\), found 2 \(0, 10\)/,
    );
    expectError(
      () =>
        fitUnivariate(
          { concentration: [0, 10, 20, 0, 10, 20], response: [0, 1, 1.9, 0.1, 1.1, 2] },
          { form: 'quadratic' },
        ),
      'INSUFFICIENT_DATA',
      /needs at least 4 distinct concentration levels \(3 parameters \+ 1\), found 3/,
    );
  });

  it('refuses unequal lengths, negative concentrations, unknown options and flat responses', () => {
    expectError(
      () => fitUnivariate({ concentration: [0, 1, 2], response: [0, 1] }, { form: 'linear' }),
      'INVALID_VALUE',
      /concentration has 3 values and response has 2/,
    );
    expectError(
      () => fitUnivariate({ concentration: [0, -1, 2], response: [0, 1, 2] }, { form: 'linear' }),
      'INVALID_VALUE',
      /concentration\[1\] = -1, must be >= 0/,
    );
    expectError(
      () => fitUnivariate({ concentration: [0, 1, 2], response: [0, 1, 2] }, { form: 'cubic' as CurveForm }),
      'INVALID_VALUE',
      /form = "cubic", must be one of linear, origin, quadratic/,
    );
    expectError(
      () =>
        fitUnivariate(
          { concentration: [0, 1, 2], response: [0, 1, 2] },
          { form: 'linear', weights: '1/y' as WeightScheme },
        ),
      'INVALID_VALUE',
      /weights = "1\/y"/,
    );
    expectError(
      () => fitUnivariate({ concentration: [0, 1, 2], response: [0, 1, 2] }, { form: 'linear', alpha: 0.5 }),
      'INVALID_VALUE',
      /alpha = 0.5/,
    );
    expectError(
      () => fitUnivariate({ concentration: [0, 1, 2], response: [3, 3, 3] }, { form: 'linear' }),
      'INVALID_VALUE',
      /every response is 3/,
    );
  });

  it('checks weighting requirements', () => {
    const concentration = [0, 10, 20, 30];
    const response = [0.1, 1.0, 2.1, 2.9];
    expectError(
      () => fitUnivariate({ concentration, response }, { form: 'linear', weights: '1/x', weightFloor: 0 }),
      'INVALID_VALUE',
      /weightFloor = 0, must be a finite concentration > 0/,
    );
    expectError(
      () => fitUnivariate({ concentration, response }, { form: 'linear', weights: 'replicates' }),
      'INSUFFICIENT_DATA',
      /concentration 0 has 1 standard, needs at least 2 replicates at every level/,
    );
    expectError(
      () =>
        fitUnivariate(
          { concentration: [0, 0, 10, 10, 20, 20], response: [0.1, 0.1, 1, 1.1, 2, 2.2] },
          { form: 'linear', weights: 'replicates' },
        ),
      'INVALID_VALUE',
      /replicates at concentration 0 have identical responses \(SD 0\)/,
    );
  });

  it('refuses bad prediction requests', () => {
    const model = fitUnivariate(din.data, { form: 'linear' });
    expectError(() => predictUnivariate(model, []), 'INVALID_VALUE', /responses must be a non-empty array/);
    expectError(
      () => predictUnivariate(model, [3500, Number.NaN]),
      'INVALID_VALUE',
      /responses\[1\] = NaN, must be a finite number/,
    );
    expectError(
      () => predictUnivariate(model, [3500], { level: 95 }),
      'INVALID_VALUE',
      /level = 95, must be strictly between 0 and 1/,
    );
    const quadratic = fitUnivariate(din.data, { form: 'quadratic' });
    expectError(
      () => predictUnivariate(quadratic, [3500], { method: 'fieller' }),
      'INVALID_VALUE',
      /fieller" applies to straight-line calibrations/,
    );
  });

  it('does not modify its inputs or the model', () => {
    const data = deepFreeze({
      concentration: [0, 10, 20, 30, 40, 0, 10, 20, 30, 40],
      response: [0.1, 1.0, 2.1, 2.9, 4.2, 0.05, 1.1, 1.95, 3.05, 4.0],
    });
    const before = JSON.stringify(data);
    for (const form of ['linear', 'origin', 'quadratic'] as const) {
      for (const weights of ['none', '1/x', '1/x2', 'replicates'] as const) {
        const model = deepFreeze(fitUnivariate(data, { form, weights }));
        const snapshot = JSON.stringify(model);
        const responses = deepFreeze([2.5, 2.6]);
        predictUnivariate(model, responses);
        if (form !== 'quadratic') predictUnivariate(model, responses, { method: 'fieller' });
        fittedCurveWithBands(model, deepFreeze([0, 25, 40]));
        expect(JSON.stringify(model)).toBe(snapshot);
        expect(responses).toEqual([2.5, 2.6]);
      }
    }
    expect(JSON.stringify(data)).toBe(before);
  });
});

describe('the model is plain JSON-safe data', () => {
  it('survives a JSON round trip unchanged for every form and weighting', () => {
    const data = {
      concentration: [0, 10, 20, 30, 40, 0, 10, 20, 30, 40],
      response: [0.1, 1.0, 2.1, 2.9, 4.2, 0.05, 1.1, 1.95, 3.05, 4.0],
    };
    for (const form of ['linear', 'origin', 'quadratic'] as const) {
      for (const weights of ['none', '1/x', '1/x2', 'replicates'] as const) {
        const model = fitUnivariate(data, { form, weights });
        const copy = JSON.parse(JSON.stringify(model)) as UnivariateModel;
        expect(copy).toEqual(model);
        expect(predictUnivariate(copy, [2])).toEqual(predictUnivariate(model, [2]));
        for (const limit of [model.limits.decision, model.limits.detection, model.limits.determination]) {
          expect(limit.definition.length).toBeGreaterThan(20);
        }
      }
    }
  });
});

describe('weighting', () => {
  it('1/x weights give blanks the floor weight, recorded in the model with a warning', () => {
    const data = { concentration: [0, 5, 10, 20, 40], response: [0.02, 0.51, 1.02, 1.98, 4.05] };
    const model = fitUnivariate(data, { form: 'linear', weights: '1/x' });
    expect(model.weighting.floor).toBe(5);
    expect(model.warnings.join('\n')).toMatch(
      /weights 1\/x: 1 standard below the floor 5 .* weighted as if at 5/,
    );
    expectRelative(weightAt(model, 0), weightAt(model, 5), 1e-15, 'w(0) = w(floor)');
    expectRelative(weightAt(model, 40) * 40, weightAt(model, 10) * 10, 1e-14, 'w ∝ 1/x');
    const explicit = fitUnivariate(data, { form: 'linear', weights: '1/x2', weightFloor: 1 });
    expect(explicit.weighting.floor).toBe(1);
    expectRelative(model.sumWeights, data.concentration.length, 1e-14, 'Σw = n');
  });

  // Source: definition of weighted least squares with weights 1/sᵢ² (common practice); the level
  // SDs are recomputed here independently.
  it('replicate weighting uses 1/s² of each level and matches a direct weighted fit', () => {
    const data = {
      concentration: [0, 0, 0, 10, 10, 10, 20, 20, 20],
      response: [0.01, 0.03, 0.02, 1.0, 1.08, 0.95, 2.1, 1.85, 2.02],
    };
    const model = fitUnivariate(data, { form: 'linear', weights: 'replicates' });
    const sd = (values: number[]): number => {
      const mean = values.reduce((a, b) => a + b, 0) / values.length;
      return Math.sqrt(values.reduce((a, b) => a + (b - mean) ** 2, 0) / (values.length - 1));
    };
    const levelSD = [sd([0.01, 0.03, 0.02]), sd([1.0, 1.08, 0.95]), sd([2.1, 1.85, 2.02])];
    model.weighting.levels?.forEach((level, i) =>
      expectRelative(level.sd, levelSD[i] as number, 1e-14, `SD at level ${level.concentration}`),
    );
    const direct = leastSquares(
      data.concentration.map((x) => [1, x]),
      data.response,
      { weights: data.concentration.map((x) => 1 / (levelSD[x / 10] as number) ** 2) },
    );
    expectRelative(model.coefficients.a, direct.coefficients[0] as number, 1e-10, 'a');
    expectRelative(model.coefficients.b, direct.coefficients[1] as number, 1e-10, 'b');
    expectRelative(
      model.standardErrors.b,
      direct.standardErrors[1] as number,
      1e-10,
      'SE(b), independent of weight normalisation',
    );
  });
});

describe('second-order inversion, extrapolation and Fieller', () => {
  const concentration = [0, 100, 200, 300, 400, 500];
  const curve = (x: number): number => 0.02 + 0.03 * x - 2e-5 * x * x; // turns at x = 750
  const response = concentration.map((x, i) => curve(x) + [0.01, -0.02, 0.015, -0.01, 0.02, -0.015][i]!);
  const model = fitUnivariate({ concentration, response }, { form: 'quadratic' });

  it('refuses a response beyond the vertex with NO_SOLUTION', () => {
    const { a, b, c } = model.coefficients;
    const vertex = -b / (2 * c);
    const top = a + b * vertex + c * vertex * vertex;
    expectError(
      () => predictUnivariate(model, [top + 1]),
      'NO_SOLUTION',
      /beyond the vertex of the second-order calibration \(its highest response is [0-9.]+, at concentration [0-9.]+\)/,
    );
  });

  it('flags extrapolation on the calibrated branch', () => {
    const above = predictUnivariate(model, [curve(600)]);
    expect(above.extrapolated).toBe(true);
    expect(Math.abs(above.value - 600)).toBeLessThan(10);
    expect(above.warnings.join('\n')).toMatch(/outside the calibrated range 0–500 \(extrapolated\)/);
    expect(predictUnivariate(model, [curve(250)]).extrapolated).toBe(false);
    expect(predictUnivariate(model, [curve(250)]).degreesOfFreedom).toBe(3);
  });

  it('through-origin inversion uses n − 1 degrees of freedom and warns of a real intercept', () => {
    const origin = fitUnivariate(din.data, { form: 'origin' });
    expect(predictUnivariate(origin, [4000]).degreesOfFreedom).toBe(9);
    expect(origin.warnings.join('\n')).toMatch(/through-origin calibration is biased/);
  });

  it('Fieller interval is unbounded, by a flag and null ends, when the slope is poorly determined', () => {
    const weak = fitUnivariate(
      { concentration: [0, 1, 2, 3, 4], response: [1.0, 0.7, 1.3, 0.8, 1.25] },
      { form: 'linear' },
    );
    expect(weak.warnings.join('\n')).toMatch(/not significantly different from zero/);
    const estimate = predictUnivariate(weak, [1.1], { method: 'fieller' });
    expect(estimate.unbounded).toBe(true);
    expect(estimate.low).toBeNull();
    expect(estimate.high).toBeNull();
    expect(estimate.g as number).toBeGreaterThanOrEqual(1);
    expect(estimate.warnings.join('\n')).toMatch(/Fieller interval is unbounded/);
  });

  // Source: Fieller's theorem — for a well-determined slope (g → 0) the Fieller interval tends to
  // the standard one (common practice); here g ≈ 0.02.
  it('Fieller and standard intervals nearly agree when g is small (DIN 32645 data)', () => {
    const dinModel = fitUnivariate(din.data, { form: 'linear' });
    const standard = predictUnivariate(dinModel, [5000]);
    const fieller = predictUnivariate(dinModel, [5000], { method: 'fieller' });
    expect(fieller.g as number).toBeLessThan(0.05);
    expectRelative(
      (fieller.high as number) - (fieller.low as number),
      (standard.high as number) - (standard.low as number),
      0.02,
      'interval width',
    );
  });

  it('the response band brackets the standards at the prediction level', () => {
    const band = fittedCurveWithBands(model, [0, 250, 500]);
    expect(band).toHaveLength(3);
    for (const point of band) {
      expect(point.prediction[0]).toBeLessThan(point.confidence[0]);
      expect(point.confidence[1]).toBeLessThan(point.prediction[1]);
    }
  });
});

describe('interval coverage by simulation (seeded)', () => {
  /** Fraction of repeats whose interval contains the true concentration. */
  function coverage(options: {
    seed: number;
    repeats: number;
    form: CurveForm;
    weights: WeightScheme;
    truth: (x: number) => number;
    sd: (x: number) => number;
    method: 'standard' | 'fieller';
  }): number {
    const { uniform, normal } = seededNormal(options.seed);
    const concentration = [0, 20, 40, 60, 80, 100, 0, 20, 40, 60, 80, 100];
    let covered = 0;
    for (let repeat = 0; repeat < options.repeats; repeat++) {
      const response = concentration.map((x) => options.truth(x) + options.sd(x) * normal());
      const model = fitUnivariate(
        { concentration, response },
        { form: options.form, weights: options.weights },
      );
      const x0 = 10 + 80 * uniform();
      const estimate = predictUnivariate(model, [options.truth(x0) + options.sd(x0) * normal()], {
        level: 0.95,
        method: options.method,
      });
      if (estimate.low !== null && estimate.high !== null && estimate.low <= x0 && x0 <= estimate.high)
        covered++;
    }
    return covered / options.repeats;
  }

  // DESIGN §5: a 95 % interval covers the truth in about 95 % of noisy repeats. 4000 repeats give a
  // binomial SE of 0.34 %, so 94–96 % is a ±3 SE band.
  it('straight line, Gaussian noise: the 95 % inverse-prediction interval covers 94–96 %', () => {
    const value = coverage({
      seed: 20240601,
      repeats: 4000,
      form: 'linear',
      weights: 'none',
      truth: (x) => 0.5 + 0.1 * x,
      sd: () => 1,
      method: 'standard',
    });
    expect(value, `coverage ${value}`).toBeGreaterThanOrEqual(0.94);
    expect(value, `coverage ${value}`).toBeLessThanOrEqual(0.96);
  });

  it('straight line, Fieller interval covers 94–96 %', () => {
    const value = coverage({
      seed: 777,
      repeats: 4000,
      form: 'linear',
      weights: 'none',
      truth: (x) => 0.5 + 0.1 * x,
      sd: () => 1,
      method: 'fieller',
    });
    expect(value, `coverage ${value}`).toBeGreaterThanOrEqual(0.94);
    expect(value, `coverage ${value}`).toBeLessThanOrEqual(0.96);
  });

  // Scatter proportional to concentration (floor at the lowest standard), 1/x² weights: the
  // Fieller interval takes w(x) at each x, so its coverage is exact under that variance model.
  it('weighted 1/x², Fieller interval covers 94–96 %', () => {
    const value = coverage({
      seed: 99,
      repeats: 4000,
      form: 'linear',
      weights: '1/x2',
      truth: (x) => 0.5 + 0.1 * x,
      sd: (x) => 0.02 * Math.max(x, 20),
      method: 'fieller',
    });
    expect(value, `coverage ${value}`).toBeGreaterThanOrEqual(0.94);
    expect(value, `coverage ${value}`).toBeLessThanOrEqual(0.96);
  });
});
