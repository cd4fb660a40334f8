/**
 * Fitting a univariate calibration: checks the standards and options, weights the standards
 * (`weights.ts`), fits the curve by QR on centred and scaled x (`curve-fit.ts`), runs Mandel's
 * fitting test, computes the detection limits (`limits.ts`) and notes what a person should know
 * (a biased through-origin fit, an insignificant slope, a curve that turns inside the range).
 */
import { BandwrightError } from '../../errors.js';
import { criticalT } from '../../stats/distributions.js';
import { mandelTest, type MandelResult } from '../../stats/mandel.js';
import { fitCurve } from './curve-fit.js';
import { limitsFor } from './limits.js';
import {
  CURVE_FORMS,
  MAX_MAGNITUDE,
  WEIGHT_SCHEMES,
  type Coefficients,
  type CurveForm,
  type UnivariateData,
  type UnivariateFitOptions,
  type UnivariateModel,
} from './model.js';
import { groupLevels, weightStandards } from './weights.js';
import { significantDigits } from '../../words.js';

const FORM_PARAMETERS: Record<CurveForm, ('a' | 'b' | 'c')[]> = {
  linear: ['a', 'b'],
  origin: ['b'],
  quadratic: ['a', 'b', 'c'],
};
const FORM_NAMES: Record<CurveForm, string> = {
  linear: 'straight-line',
  origin: 'through-origin',
  quadratic: 'second-order',
};

function checkSeries(values: unknown, name: string): number[] {
  if (!Array.isArray(values))
    throw new BandwrightError('INVALID_VALUE', `${name} must be an array of numbers`, { parameter: name });
  return values.map((value: unknown, i: number) => {
    if (typeof value !== 'number' || !Number.isFinite(value)) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${name}[${i}] = ${String(value)}, must be a finite number`,
        { parameter: `${name}[${i}]` },
      );
    }
    if (Math.abs(value) > MAX_MAGNITUDE) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${name}[${i}] = ${String(value)}, must be within ±${MAX_MAGNITUDE} (sums of squares must stay finite ` +
          `in double precision)`,
        { parameter: `${name}[${i}]` },
      );
    }
    return value;
  });
}

/** Checks the form, weighting and α; returns them with defaults applied. */
function checkOptions(options: UnivariateFitOptions): {
  form: CurveForm;
  scheme: NonNullable<UnivariateFitOptions['weights']>;
  alpha: number;
} {
  const form = options?.form;
  if (!CURVE_FORMS.includes(form)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `form = ${JSON.stringify(form)}, must be one of ${CURVE_FORMS.join(', ')}`,
      { parameter: 'form' },
    );
  }
  const scheme = options.weights ?? 'none';
  if (!WEIGHT_SCHEMES.includes(scheme)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `weights = ${JSON.stringify(scheme)}, must be one of ${WEIGHT_SCHEMES.join(', ')}`,
      { parameter: 'weights' },
    );
  }
  const alpha = options.alpha ?? 0.05;
  if (!(alpha > 0 && alpha < 0.5))
    throw new BandwrightError('INVALID_VALUE', `alpha = ${alpha}, must be between 0 and 0.5`, {
      parameter: 'alpha',
    });
  return { form, scheme, alpha };
}

/** Refuses standards that cannot support the form: too few levels, or no change in response. */
function checkLevels(form: CurveForm, levels: readonly number[], n: number, y: readonly number[]): void {
  const p = FORM_PARAMETERS[form].length;
  if (n === 0)
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `no standards: a ${FORM_NAMES[form]} calibration needs at least ${p + 1} distinct concentration levels`,
      { parameter: 'concentration' },
    );
  if (levels.length === 1) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `all ${n} standards are at one concentration (${levels[0] as number}): a calibration needs standards at ` +
        `different concentrations (at least ${p + 1} levels for a ${FORM_NAMES[form]} fit)`,
      { parameter: 'concentration' },
    );
  }
  if (levels.length < p + 1) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `a ${FORM_NAMES[form]} calibration needs at least ${p + 1} distinct concentration levels (${p} ` +
        `parameters + 1), found ${levels.length} (${levels.join(', ')})`,
      { parameter: 'concentration' },
    );
  }
  if (y.every((value) => value === y[0])) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `every response is ${y[0] as number}: the response does not change with concentration, so no calibration ` +
        `can be made`,
      { parameter: 'response' },
    );
  }
}

/**
 * Fits a univariate calibration to standards.
 *
 * @param data - concentrations (calibration unit, ≥ 0) and responses of the standards; not modified
 * @param options - form, weighting, α for the limits, weight floor
 * @returns a JSON-safe model with coefficients in original units, covariance, statistics,
 *   Mandel test, detection limits and warnings
 * @throws BandwrightError `INVALID_VALUE` for unequal lengths, non-finite or negative
 *   concentrations, non-finite responses, unknown form or weights, α outside (0, 0.5), a weight
 *   floor ≤ 0, replicate levels without scatter, or responses that do not change at all;
 *   `INSUFFICIENT_DATA` when all standards are at one concentration, there are fewer distinct
 *   levels than parameters + 1, or `replicates` weighting finds a level with one standard;
 *   `SINGULAR` when the design is too ill-conditioned to fit
 * @example
 * const model = fitUnivariate(
 *   { concentration: [0, 50, 100, 150], response: [0.02, 4.1, 8.05, 12.2] },
 *   { form: 'linear' },
 * );
 * predictUnivariate(model, [6.1]).value; // ≈ 75
 */
export function fitUnivariate(data: UnivariateData, options: UnivariateFitOptions): UnivariateModel {
  const x = checkSeries(data?.concentration, 'concentration');
  const y = checkSeries(data?.response, 'response');
  if (x.length !== y.length) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `concentration has ${x.length} values and response has ${y.length}, must be equal (one response per standard)`,
      { parameter: 'response' },
    );
  }
  const { form, scheme, alpha } = checkOptions(options);
  x.forEach((value, i) => {
    if (value < 0)
      throw new BandwrightError(
        'INVALID_VALUE',
        `concentration[${i}] = ${value}, must be >= 0 (a certified concentration)`,
        { parameter: `concentration[${i}]` },
      );
  });
  const n = x.length;
  const parameters = FORM_PARAMETERS[form];
  const groups = groupLevels(x, y);
  const levels = groups.map((group) => group.level);
  checkLevels(form, levels, n, y);

  const weighted = weightStandards(x, groups, scheme, options.weightFloor);
  const { weighting, weights } = weighted;
  const warnings = weighted.warnings;
  const sumWeights = weights.reduce((a, b) => a + b, 0);
  const meanX = x.reduce((sum, value, i) => sum + (weights[i] as number) * value, 0) / sumWeights;
  const meanResponse = y.reduce((sum, value, i) => sum + (weights[i] as number) * value, 0) / sumWeights;
  const sxx = x.reduce((sum, value, i) => sum + (weights[i] as number) * (value - meanX) ** 2, 0);
  const sumXSquared = x.reduce((sum, value, i) => sum + (weights[i] as number) * value * value, 0);
  const spread = Math.max(...x.map((value) => Math.abs(value - meanX)));

  const main = fitCurve(form, x, y, weights, meanX, spread);
  const { fit, coefficients, covariance } = main;
  const standardErrors: Coefficients = {
    a: Math.sqrt(Math.max(0, (covariance[0] as number[])[0] as number)),
    b: Math.sqrt(Math.max(0, (covariance[1] as number[])[1] as number)),
    c: Math.sqrt(Math.max(0, (covariance[2] as number[])[2] as number)),
  };

  let mandel: MandelResult | null = null;
  if (n >= 4 && levels.length >= 3) {
    try {
      const linear = form === 'linear' ? fit : fitCurve('linear', x, y, weights, meanX, spread).fit;
      const quadratic = form === 'quadratic' ? fit : fitCurve('quadratic', x, y, weights, meanX, spread).fit;
      mandel = mandelTest({
        n,
        linearResidualVariance: linear.rss / (n - 2),
        quadraticResidualVariance: quadratic.rss / (n - 3),
      });
    } catch (error) {
      if (!(error instanceof BandwrightError && error.code === 'SINGULAR')) throw error;
      warnings.push(`Mandel test not run: ${error.message}`);
    }
  } else {
    warnings.push(
      `Mandel test not run: it needs at least 4 standards at 3 or more concentration levels (found ${n} at ` +
        `${levels.length})`,
    );
  }
  if (mandel !== null) {
    if (mandel.significant && form !== 'quadratic') warnings.push(`Mandel test: ${mandel.recommendation}`);
    if (!mandel.significant && form === 'quadratic') warnings.push(`Mandel test: ${mandel.recommendation}`);
  }

  if (form === 'origin') {
    const straight = fitCurve('linear', x, y, weights, meanX, spread);
    const interceptSE = Math.sqrt(Math.max(0, (straight.covariance[0] as number[])[0] as number));
    const tIntercept = criticalT(0.95, straight.fit.degreesOfFreedom);
    if (Math.abs(straight.coefficients.a) > tIntercept * interceptSE) {
      warnings.push(
        `a straight line with intercept gives a = ${significantDigits(straight.coefficients.a)} ` +
          `± ${significantDigits(interceptSE)} ` +
          `(standard error), significantly different from 0 at 95 %: a through-origin calibration is biased on ` +
          `these standards`,
      );
    }
  }

  const degreesOfFreedom = fit.degreesOfFreedom;
  const tSlope = criticalT(0.95, degreesOfFreedom);
  if (Math.abs(coefficients.b) < tSlope * standardErrors.b && form !== 'quadratic') {
    warnings.push(
      `the slope b = ${significantDigits(coefficients.b)} is not significantly different from zero (standard error ` +
        `${significantDigits(standardErrors.b)}, 95 %): concentrations inferred from this calibration are unreliable`,
    );
  }
  const range: [number, number] = [levels[0] as number, levels[levels.length - 1] as number];
  if (form === 'quadratic' && coefficients.c !== 0) {
    const vertex = -coefficients.b / (2 * coefficients.c);
    if (vertex > range[0] && vertex < range[1]) {
      warnings.push(
        `the second-order curve turns at concentration ${significantDigits(vertex)}, inside the calibrated range ` +
          `${range[0]}–${range[1]}: responses near the turn do not determine one concentration`,
      );
    }
  }

  const fitted = {
    kind: 'univariate' as const,
    form,
    weights: scheme,
    weighting,
    parameters: [...parameters],
    coefficients,
    standardErrors,
    covariance,
    residualSD: fit.residualSD,
    degreesOfFreedom,
    standards: n,
    sumWeights,
    meanX,
    sxx,
    sumXSquared,
    meanResponse,
    rSquared: fit.rSquared,
    rSquaredKind: fit.rSquaredKind,
    conditionNumber: fit.conditionNumber,
    residuals: fit.residuals,
    data: { concentration: [...x], response: [...y] },
    range,
    levels,
    mandel,
  };
  const limits = limitsFor({ ...fitted, alpha, warnings });
  return { ...fitted, limits, alpha, warnings };
}
