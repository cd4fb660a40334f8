/**
 * Decision, detection and determination limits of a fitted univariate calibration: the DIN 32645
 * straight-line formulas for an unweighted straight line, their delta-method generalisation
 * (`curveLimits`) for the other forms and for weighted fits.
 */
import {
  curveLimits,
  straightLineLimits,
  type CalibrationLimits,
  type LimitValue,
} from '../../stats/detection.js';
import { fittedVarianceAt, type UnivariateModel } from './model.js';
import { weightAt } from './weights.js';

/**
 * Limits that cannot be computed, each saying why.
 *
 * @param reason - why, in words
 * @param alpha - α the limits would have used
 * @param degreesOfFreedom - residual degrees of freedom of the fit
 */
export function unavailableLimits(
  reason: string,
  alpha: number,
  degreesOfFreedom: number,
): CalibrationLimits {
  const none = (name: string): LimitValue => ({
    value: null,
    definition: `${name}: not computed, ${reason}`,
  });
  return {
    decision: none('decision limit'),
    detection: none('detection limit'),
    determination: none('determination limit'),
    ichDetection: none('detection limit (ICH Q2)'),
    ichQuantitation: none('quantitation limit (ICH Q2)'),
    alpha,
    beta: alpha,
    k: 3,
    replicates: 1,
    degreesOfFreedom,
  };
}

/**
 * The limits of a fitted model (everything but its `limits` field is read).
 *
 * @param model - the fitted model
 * @returns the limits, each with its definition; null values say why they are missing
 */
export function limitsFor(model: Omit<UnivariateModel, 'limits'>): CalibrationLimits {
  const { form, coefficients, covariance, residualSD, degreesOfFreedom, alpha } = model;
  const slopeAtZero = coefficients.b;
  if (!(residualSD > 0))
    return unavailableLimits(
      'the residual SD is 0 (the curve passes through every standard), so the noise cannot be estimated',
      alpha,
      degreesOfFreedom,
    );
  if (slopeAtZero === 0)
    return unavailableLimits('the slope at zero concentration is 0', alpha, degreesOfFreedom);
  if (form === 'linear' && model.weights === 'none') {
    return straightLineLimits(
      { n: model.standards, slope: coefficients.b, residualSD, meanX: model.meanX, sxx: model.sxx },
      { alpha },
    );
  }
  const parts: string[] = [];
  if (form === 'origin')
    parts.push(
      'straight line through the origin: the blank response is fixed at 0, so Var ŷ(0) = 0 and df = n − 1',
    );
  if (form === 'linear') parts.push('straight line');
  if (form === 'quadratic')
    parts.push(
      'second-order curve, linearised at zero concentration (slope b) for x_C and x_D and at x_Q for x_Q; df = n − 3',
    );
  if (model.weights !== 'none')
    parts.push(
      `weighted (${model.weighting.rule}): a new observation at x has variance s²/w(x), at zero concentration ` +
        `w(0) = w(${model.weighting.floor ?? 0})`,
    );
  return curveLimits(
    {
      degreesOfFreedom,
      residualSD,
      slopeAt: (x) => coefficients.b + 2 * coefficients.c * x,
      fittedVarianceAt: (x) => fittedVarianceAt(covariance, x),
      weightAt: (x) => weightAt(model, x),
      description: parts.join('; '),
    },
    { alpha },
  );
}
