/**
 * Inverse prediction: a sample's concentration from the mean ȳ0 of its m responses, with an
 * interval (t at 1 − (1 − level)/2):
 * - straight line: x̂0 = (ȳ0 − a)/b, s_x0 = (s/|b|)·√(1/(m·w0) + 1/Σw + (ȳ0 − ȳ)²/(b²·Sxx)), df = n − 2
 * - through origin: x̂0 = ȳ0/b, s_x0 = (s/|b|)·√(1/(m·w0) + x̂0²/Σw·x²), df = n − 1
 * - second order: the root of a + b·x + c·x² = ȳ0 on the branch of the curve that holds the
 *   calibrated range; var(x̂0) = (s²/(m·w0) + gᵀ·Cov·g)/(b + 2c·x̂0)², g = (1, x̂0, x̂0²), df = n − 3
 * where w0 is the weight at x̂0 (for weighted fits the new observations are assumed to scatter as
 * the standards would at that concentration; unweighted w0 = 1), ȳ and Sxx = Σw(x − x̄)² are
 * weighted. Fieller's interval (straight line and through origin) is the set of x with
 * (ȳ0 − ŷ(x))² ≤ t²·(s²/(m·w(x)) + Var ŷ(x)): in closed form when unweighted, where g =
 * t²s²/(b²Sxx) ≥ 1 (slope not significantly different from zero at that level) makes it
 * unbounded; found numerically when weighted (`inverse.ts`), with w(x) taken at each candidate x,
 * so its coverage does not rest on the plug-in w(x̂0) of the standard interval.
 */
import { BandwrightError } from '../../errors.js';
import { criticalT } from '../../stats/distributions.js';
import { fiellerByBracketing, invertCurve, quadraticRoots } from './inverse.js';
import { fittedVarianceAt, type UnivariateModel } from './model.js';
import { weightAt } from './weights.js';
import { significantDigits } from '../../words.js';

/** Options of {@link predictUnivariate}. */
export interface UnivariatePredictOptions {
  /** Two-sided confidence level of the interval, 0 < level < 1 (default 0.95). */
  level?: number;
  /** `standard` (default): the DESIGN §3 formulas; `fieller`: Fieller's exact interval (straight lines only). */
  method?: 'standard' | 'fieller';
}

/** A concentration inferred from responses, with its interval. JSON-safe. */
export interface UnivariatePrediction {
  /** Estimated concentration x̂0, calibration units. */
  value: number;
  /** Standard error of x̂0 (delta method). */
  se: number;
  /** Lower end of the interval, or null when a Fieller interval is unbounded below. */
  low: number | null;
  /** Upper end of the interval, or null when a Fieller interval is unbounded above. */
  high: number | null;
  /** Confidence level. */
  level: number;
  /** Degrees of freedom of the t quantile. */
  degreesOfFreedom: number;
  /** t quantile used. */
  tCritical: number;
  /** Number of responses averaged. */
  m: number;
  /** Their mean ȳ0. */
  meanResponse: number;
  /** How the value and interval were computed, in words. */
  method: string;
  /** True when x̂0 lies outside the calibrated range. */
  extrapolated: boolean;
  /** True when a Fieller interval has an unbounded end (unweighted: g ≥ 1, then both ends are null). */
  unbounded: boolean;
  /** g = t²s²/(b²Sxx) for straight lines (slope's relative uncertainty), null for second order. */
  g: number | null;
  /** Notes about this estimate (poorly determined slope, extrapolation). */
  warnings: string[];
}

function checkResponses(responses: readonly number[]): { mean: number; m: number } {
  if (!Array.isArray(responses) || responses.length === 0) {
    throw new BandwrightError(
      'INVALID_VALUE',
      "responses must be a non-empty array of numbers (the sample's replicate responses)",
      { parameter: 'responses' },
    );
  }
  let sum = 0;
  responses.forEach((value: unknown, i: number) => {
    if (typeof value !== 'number' || !Number.isFinite(value)) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `responses[${i}] = ${String(value)}, must be a finite number`,
        { parameter: `responses[${i}]` },
      );
    }
    sum += value;
  });
  return { mean: sum / responses.length, m: responses.length };
}

function checkOptions(
  model: UnivariateModel,
  options: UnivariatePredictOptions,
): {
  level: number;
  method: 'standard' | 'fieller';
} {
  const level = options.level ?? 0.95;
  const method = options.method ?? 'standard';
  if (!(level > 0 && level < 1))
    throw new BandwrightError('INVALID_VALUE', `level = ${level}, must be strictly between 0 and 1`, {
      parameter: 'level',
    });
  if (method !== 'standard' && method !== 'fieller') {
    throw new BandwrightError(
      'INVALID_VALUE',
      `method = ${JSON.stringify(method)}, must be standard or fieller`,
      { parameter: 'method' },
    );
  }
  if (method === 'fieller' && model.form === 'quadratic') {
    throw new BandwrightError(
      'INVALID_VALUE',
      'method = "fieller" applies to straight-line calibrations (linear or origin), the model is second-order',
      { parameter: 'method' },
    );
  }
  return { level, method };
}

/**
 * Infers the concentration of a sample from the mean of its m replicate responses, with an
 * interval at the given level (see the module comment for the formulas).
 *
 * @param model - a model from `fitUnivariate`
 * @param responses - the sample's responses at reference conditions (same quantity as the
 *   calibration's response); not modified
 * @param options - interval level (default 0.95) and method (`standard` or `fieller`)
 * @returns value, standard error, interval (null ends when a Fieller interval is unbounded),
 *   degrees of freedom, and flags
 * @throws BandwrightError `INVALID_VALUE` for empty or non-finite responses, a level outside (0, 1),
 *   or `fieller` with a second-order model; `NO_SOLUTION` when a second-order curve cannot give the
 *   response (beyond its vertex) or gives it twice inside the calibrated range, or when the
 *   estimate or its standard error is not finite (overflow far outside the calibration)
 * @example
 * const estimate = predictUnivariate(model, [6.02, 6.11], { level: 0.95 });
 * [estimate.low, estimate.value, estimate.high];
 */
export function predictUnivariate(
  model: UnivariateModel,
  responses: readonly number[],
  options: UnivariatePredictOptions = {},
): UnivariatePrediction {
  const { level, method } = checkOptions(model, options);
  const { mean, m } = checkResponses(responses);
  const { a, b } = model.coefficients;
  const s = model.residualSD;
  const df = model.degreesOfFreedom;
  const t = criticalT(level, df);
  const warnings: string[] = [];
  let value: number;
  let variance: number;
  let g: number | null = null;
  let description: string;
  let newObservationTerm: number;
  const quantile = `t(${1 - (1 - level) / 2}, ${df})`;

  if (model.form === 'quadratic') {
    value = invertCurve(model, mean);
    const w0 = weightAt(model, value);
    const slope = b + 2 * model.coefficients.c * value;
    newObservationTerm = (s * s) / (m * w0);
    variance = (newObservationTerm + fittedVarianceAt(model.covariance, value)) / (slope * slope);
    description =
      `second-order inverse prediction: root of a + b·x + c·x² = ȳ0 on the calibrated branch, ` +
      `delta-method interval x̂0 ± ${quantile}·s_x0 with var = (s²/(m·w0) + gᵀCov g)/(b + 2c·x̂0)²`;
  } else if (model.form === 'linear') {
    value = (mean - a) / b;
    const w0 = weightAt(model, value);
    newObservationTerm = 1 / (m * w0);
    variance =
      ((s * s) / (b * b)) *
      (newObservationTerm + 1 / model.sumWeights + (mean - model.meanResponse) ** 2 / (b * b * model.sxx));
    g = (t * t * s * s) / (b * b * model.sxx);
    description =
      `straight-line inverse prediction: x̂0 = (ȳ0 − a)/b ± ${quantile}·s_x0, s_x0 = ` +
      `(s/|b|)·√(1/(m·w0) + 1/n + (ȳ0 − ȳ)²/(b²·Sxx))`;
  } else {
    value = mean / b;
    const w0 = weightAt(model, value);
    newObservationTerm = 1 / (m * w0);
    variance = ((s * s) / (b * b)) * (newObservationTerm + (value * value) / model.sumXSquared);
    g = (t * t * s * s) / (b * b * model.sumXSquared);
    description =
      `through-origin inverse prediction: x̂0 = ȳ0/b ± ${quantile}·s_x0, s_x0 = (s/|b|)·√(1/(m·w0) ` +
      `+ x̂0²/Σx²)`;
  }
  if (model.weights !== 'none')
    description += `; w0 = w(x̂0) = ${significantDigits(weightAt(model, value))} from the calibration's weighting`;
  const se = Math.sqrt(variance);
  // A response far outside the calibration (or a damaged model) can overflow the arithmetic; a
  // NaN or infinite estimate must never leave here looking like a result.
  if (!Number.isFinite(value) || !Number.isFinite(se)) {
    throw new BandwrightError(
      'NO_SOLUTION',
      `response ${significantDigits(mean)} gives concentration ${significantDigits(value)} ` +
        `with standard error ${significantDigits(se)}: not a ` +
        `finite estimate; the response is too far outside the calibrated responses ` +
        `(${significantDigits(model.meanResponse)} on average) or the model is damaged`,
      { parameter: 'responses' },
    );
  }
  let low: number | null = value - t * se;
  let high: number | null = value + t * se;
  let unbounded = false;
  if (method === 'fieller') {
    const gValue = g as number;
    if (model.weights === 'none') {
      let quadratic: [number, number, number];
      let shift = 0;
      if (model.form === 'linear') {
        // (D − b·z)² = t²s²(1/m + 1/n + z²/Sxx) with z = x − x̄ and D = ȳ0 − ȳ.
        const D = mean - model.meanResponse;
        quadratic = [
          b * b * (1 - gValue),
          -2 * b * D,
          D * D - t * t * s * s * (newObservationTerm + 1 / model.sumWeights),
        ];
        shift = model.meanX;
      } else {
        quadratic = [b * b * (1 - gValue), -2 * b * mean, mean * mean - t * t * s * s * newObservationTerm];
      }
      description =
        `Fieller interval: the concentrations x with (ȳ0 − ŷ(x))² ≤ t²·Var(ȳ0 − ŷ(x)), t = ` +
        `${quantile}, solved in closed form; g = t²s²/(b²·S) = ${significantDigits(gValue)}`;
      if (gValue >= 1) {
        unbounded = true;
        low = null;
        high = null;
      } else {
        // With g < 1 the set holds x̂0, so the discriminant is >= 0; at tiny t (levels near 0) it
        // can fall below 0 by rounding, which left both ends NaN: take the double root then.
        const roots = quadraticRoots(...quadratic);
        if (roots.length === 0) roots.push(-quadratic[1] / (2 * quadratic[0]));
        low = shift + (roots[0] as number);
        high = shift + (roots[roots.length - 1] as number);
      }
    } else {
      const ends = fiellerByBracketing(model, mean, m, t, value, se);
      low = ends.low;
      high = ends.high;
      unbounded = low === null || high === null;
      description =
        `Fieller interval: the concentrations x with (ȳ0 − ŷ(x))² ≤ t²·(s²/(m·w(x)) + Var ŷ(x)), t ` +
        `= ${quantile}, with the weight w(x) taken at each x (${model.weighting.rule}), solved numerically; g ` +
        `= t²s²/(b²·S) = ${significantDigits(gValue)}`;
    }
    if (unbounded) {
      description += '; the slope is too poorly determined at this level, so the interval is unbounded';
      warnings.push(
        `the Fieller interval is unbounded (g = ${significantDigits(gValue)}): the calibration's slope is too poorly ` +
          `determined to bound this concentration at level ${level}`,
      );
    }
  } else if (g !== null && g > 0.1) {
    warnings.push(
      `the slope is poorly determined (g = ${significantDigits(g)} > 0.1): ` +
        `the standard interval is only approximate; use the Fieller method`,
    );
  }
  const [rangeLow, rangeHigh] = model.range;
  const tolerance = 1e-9 * (rangeHigh - rangeLow);
  const extrapolated = value < rangeLow - tolerance || value > rangeHigh + tolerance;
  if (extrapolated)
    warnings.push(
      `concentration ${significantDigits(value)} is outside the calibrated range ` +
        `${rangeLow}–${rangeHigh} (extrapolated)`,
    );
  return {
    value,
    se,
    low,
    high,
    level,
    degreesOfFreedom: df,
    tCritical: t,
    m,
    meanResponse: mean,
    method: description,
    extrapolated,
    unbounded,
    g,
    warnings,
  };
}
