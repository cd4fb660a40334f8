/**
 * The fitted curve with its confidence band (the curve itself, Var ŷ(x) = gᵀ·Cov·g) and
 * prediction band (one new response at x, variance s²/w(x) + Var ŷ(x)), for plotting a
 * calibration curve.
 */
import { BandwrightError } from '../../errors.js';
import { criticalT } from '../../stats/distributions.js';
import { fittedVarianceAt, type UnivariateModel } from './model.js';
import { weightAt } from './weights.js';

/** Fitted response at a concentration with its confidence and prediction bands. */
export interface FittedCurvePoint {
  /** Concentration, calibration units. */
  concentration: number;
  /** Fitted response ŷ(x). */
  response: number;
  /** Standard error of ŷ(x) (the curve itself). */
  se: number;
  /** Confidence band for the curve at the level. */
  confidence: [number, number];
  /** Prediction band for one new response at x (variance s²/w(x) + Var ŷ(x)). */
  prediction: [number, number];
}

/**
 * Fitted responses with confidence and prediction bands, for plotting a calibration curve.
 *
 * @param model - a fitted model
 * @param concentrations - where to evaluate, calibration units; not modified
 * @param options - two-sided level (default 0.95)
 * @returns one point per concentration
 * @throws BandwrightError `INVALID_VALUE` for a non-finite concentration or a level outside (0, 1)
 */
export function fittedCurveWithBands(
  model: UnivariateModel,
  concentrations: readonly number[],
  options: { level?: number } = {},
): FittedCurvePoint[] {
  const level = options.level ?? 0.95;
  const t = criticalT(level, model.degreesOfFreedom);
  const { a, b, c } = model.coefficients;
  return concentrations.map((x, i) => {
    if (!Number.isFinite(x))
      throw new BandwrightError('INVALID_VALUE', `concentrations[${i}] = ${x}, must be a finite number`, {
        parameter: `concentrations[${i}]`,
      });
    const response = a + b * x + c * x * x;
    const fittedVariance = fittedVarianceAt(model.covariance, x);
    const se = Math.sqrt(fittedVariance);
    const predictionSE = Math.sqrt(
      fittedVariance + (model.residualSD * model.residualSD) / weightAt(model, x),
    );
    return {
      concentration: x,
      response,
      se,
      confidence: [response - t * se, response + t * se],
      prediction: [response - t * predictionSE, response + t * predictionSE],
    };
  });
}
