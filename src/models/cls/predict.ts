/**
 * Prediction with a CLS model: θ̂ = M y, the second-order solution where there are second-order
 * terms (`gauss-newton.ts`), the residual and the intervals.
 *
 * Uncertainty. Delta method with the calibration term of the textbook CLS formula:
 * Cov(ĉ) = s² (1 + θ(ĉ)ᵀ (XᵀX)⁻¹ θ(ĉ)) · J⁺ R J⁺ᵀ, J = ∂(Kᵀθ)/∂c at ĉ (J = Kᵀ when linear),
 * R the channel-noise correlation matrix estimated from the calibration residuals
 * (`noise.ts`; R = I reproduces the textbook σ̂² (K Kᵀ)⁻¹ (1 + ĉᵀ (CᵀC)⁻¹ ĉ)).
 * s² pools the sample's residual with the calibration's, each divided by its expected sum of
 * squares under R: E‖y − Kᵀθ̂‖² = σ² τ_s with τ_s = N − Σ_U uᵀRu − tr W, and for the calibration
 * (n − q) τ_B with τ_B = N − Σ_U uᵀRu; degrees of freedom by Satterthwaite, ν ≈ τ/Σρ_l².
 * When the sample is flagged poor-fit, s² is the sample's own (its noise is not the
 * calibration's). Finally each component's standard error is multiplied by the inflation factor
 * from leave-one-out cross-validation (`cross-validation.ts`).
 *
 * Poor fit. Sample residual variance over calibration residual variance above both
 * F(0.99; ν_s, ν_cal) and `DEFAULT_POOR_FIT_RATIO`² (residual RMS 1.5 times the
 * calibration's): an unmodelled absorber or a different instrument state.
 */
import { BandwrightError } from '../../errors.js';
import { criticalT, fQuantile } from '../../stats/distributions.js';
import { dot, quadraticForm } from '../../stats/linear-algebra.js';
import { removeSpan } from './basis.js';
import { solveSecondOrder } from './gauss-newton.js';
import {
  DEFAULT_POOR_FIT_RATIO,
  TEST_PROBABILITY,
  type ClsCoreModel,
  type ClsEstimate,
  type ClsPredictOptions,
  type ClsPrediction,
} from './model.js';
import type { ClsState } from './prediction-state.js';
import { termValues } from './terms.js';

/** Options of {@link predictClsState}. */
export interface ClsStatePredictOptions {
  /** Residual-RMS ratio (sample / calibration) that a poor fit must also exceed. */
  readonly poorFitRatio: number;
  /** Apply the stored inflation factors (false inside cross-validation). */
  readonly inflate: boolean;
}

/** Raw prediction in φ-scaled units, before splitting into reported and interferent components. */
export interface RawPrediction {
  scaled: Float64Array;
  standardErrors: Float64Array;
  residual: Float64Array;
  residualSum: number;
  fitRatio: number;
  fitRatioLimit: number;
  poorFit: boolean;
  degreesOfFreedom: number;
  iterations: number;
  warnings: string[];
}

/**
 * Predicts φ-scaled concentrations of one sample with standard errors, residual and fit
 * diagnostics (used directly by cross-validation, which needs no names or intervals).
 *
 * @param state - prepared numeric state
 * @param sample - responses on the model's channels; not modified (lengths are the caller's check)
 * @param options - poor-fit ratio, and whether to apply the stored interval inflation
 * @returns estimates in φ-scaled units with their standard errors, residual and poor-fit test
 * @throws Error from the QR solve when the second-order Jacobian loses rank
 */
export function predictRaw(
  state: ClsState,
  sample: ArrayLike<number>,
  options: ClsStatePredictOptions,
): RawPrediction {
  const { terms, pureSpectra, predictionMatrix } = state;
  const p = state.componentCount;
  const q = terms.length;
  const y = removeSpan(sample, state.nuisance);
  const channels = y.length;
  const thetaLinear = new Float64Array(q);
  for (let t = 0; t < q; t++) thetaLinear[t] = dot(predictionMatrix[t]!, y);

  let c: Float64Array = thetaLinear.slice(0, p);
  let covarianceFactor: readonly (readonly number[])[] = state.linearCovarianceFactor;
  let iterations = 0;
  const warnings: string[] = [];
  if (q > p) {
    const solution = solveSecondOrder(state, thetaLinear);
    c = solution.concentrations;
    covarianceFactor = solution.covarianceFactor;
    iterations = solution.iterations;
    warnings.push(...solution.warnings);
  }

  const theta = termValues(terms, c);
  const residual = y;
  for (let t = 0; t < q; t++) {
    const value = theta[t]!;
    if (value === 0) continue;
    const k = pureSpectra[t]!;
    for (let j = 0; j < channels; j++) residual[j]! -= value * k[j]!;
  }
  const residualSum = dot(residual, residual);

  const sampleVariance = state.sampleResidualCount > 0 ? residualSum / state.sampleResidualCount : Number.NaN;
  const hasCalibrationResidual = state.calibrationResidualCount > 0;
  const floor = (1e-13 * state.responseScale) ** 2;
  const calibrationVariance = hasCalibrationResidual
    ? Math.max(state.calibrationResidualSum / state.calibrationResidualCount, floor)
    : Number.NaN;
  const fitRatio = hasCalibrationResidual ? sampleVariance / calibrationVariance : Number.NaN;
  const fitRatioLimit = hasCalibrationResidual
    ? Math.max(
        fQuantile(TEST_PROBABILITY, state.sampleDegreesOfFreedom, state.calibrationDegreesOfFreedom),
        options.poorFitRatio ** 2,
      )
    : Number.NaN;
  const poorFit = hasCalibrationResidual && fitRatio > fitRatioLimit;
  let variance: number;
  let degreesOfFreedom: number;
  if (poorFit || !hasCalibrationResidual) {
    variance = sampleVariance;
    degreesOfFreedom = state.sampleDegreesOfFreedom;
  } else {
    variance =
      (residualSum + state.calibrationResidualSum) /
      (state.sampleResidualCount + state.calibrationResidualCount);
    degreesOfFreedom = state.sampleDegreesOfFreedom + state.calibrationDegreesOfFreedom;
  }
  const leverage = 1 + quadraticForm(state.concentrationGramInverse, theta);
  const standardErrors = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    const factor = Math.max(covarianceFactor[j]![j]!, 0);
    const inflation = options.inflate ? state.inflation[j]! : 1;
    standardErrors[j] = Math.sqrt(variance * leverage * factor) * inflation;
  }
  return {
    scaled: c,
    standardErrors,
    residual,
    residualSum,
    fitRatio,
    fitRatioLimit,
    poorFit,
    degreesOfFreedom,
    iterations: q > p ? iterations : 0,
    warnings,
  };
}

/**
 * Predicts one sample with a prepared state and turns the φ-scaled estimates into
 * concentrations at the sample's conditions with prediction intervals.
 *
 * @param model - the model the state was built from (names, units, ranges)
 * @param state - prepared numeric state ({@link prepareClsState})
 * @param sample - responses on the model's channels (absorbance or band areas); not modified
 * @param options - the sample's φ (> 0), confidence level (default the model's), poor-fit ratio
 *   (default {@link DEFAULT_POOR_FIT_RATIO}), and what to call a channel in messages
 * @returns estimates of reported components and of interferents, residual and flags
 * @throws BandwrightError `INVALID_VALUE` for a wrong length, a non-finite value, φ ≤ 0 or a
 *   level outside (0, 1)
 */
export function predictClsState(
  model: ClsCoreModel,
  state: ClsState,
  sample: ArrayLike<number>,
  options: ClsPredictOptions & { readonly channelWord: string },
): ClsPrediction {
  const level = options.level ?? model.level;
  const poorFitRatio = options.poorFitRatio ?? DEFAULT_POOR_FIT_RATIO;
  if (sample.length !== model.channelCount) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `sample has ${sample.length} ${options.channelWord}s, the model was fitted on ${model.channelCount}, ` +
        `must be equal`,
      { parameter: 'spectrum' },
    );
  }
  for (let j = 0; j < sample.length; j++) {
    if (!Number.isFinite(sample[j])) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `sample ${options.channelWord} ${j} = ${sample[j]}, must be a finite number`,
        { parameter: 'spectrum' },
      );
    }
  }
  if (!(Number.isFinite(options.phi) && options.phi > 0)) {
    throw new BandwrightError('INVALID_VALUE', `phi = ${options.phi}, must be a finite number > 0`, {
      parameter: 'phi',
    });
  }
  if (!(poorFitRatio >= 1)) {
    throw new BandwrightError('INVALID_VALUE', `poorFitRatio = ${poorFitRatio}, must be >= 1`, {
      parameter: 'poorFitRatio',
    });
  }
  const raw = predictRaw(state, sample, { poorFitRatio, inflate: true });
  const t = criticalT(level, raw.degreesOfFreedom);
  const estimates: ClsEstimate[] = [];
  const interferents: ClsEstimate[] = [];
  model.components.forEach((component, j) => {
    const scaled = raw.scaled[j]!;
    const se = raw.standardErrors[j]!;
    const range = model.ranges[j]!;
    const flags: 'extrapolated'[] =
      scaled > range.max + se || scaled < range.min - se ? ['extrapolated'] : [];
    const value = scaled / options.phi;
    const seValue = se / options.phi;
    const estimate: ClsEstimate = {
      name: component.name,
      unit: component.unit,
      value,
      se: seValue,
      low: value - t * seValue,
      high: value + t * seValue,
      flags,
    };
    (component.reported ? estimates : interferents).push(estimate);
  });
  return {
    estimates,
    interferents,
    residualRms: Math.sqrt(raw.residualSum / raw.residual.length),
    residual: raw.residual,
    flags: raw.poorFit ? ['poor-fit'] : [],
    fitRatio: raw.fitRatio,
    fitRatioLimit: raw.fitRatioLimit,
    degreesOfFreedom: raw.degreesOfFreedom,
    level,
    iterations: raw.iterations,
    warnings: raw.warnings,
  };
}
