/**
 * Leave-one-out cross-validation of a CLS calibration and the interval inflation it implies.
 * Each standard is predicted by the model refitted without it (with the calibration's noise
 * correlation, and no condition limit: a refit that cannot separate the terms is skipped). With z
 * the LOO errors divided by their predicted standard errors, a component's factor is sqrt(mean z²)
 * when mean z² exceeds F(0.99; m, ν_cal) (m LOO predictions) and 1 otherwise — so an interval is
 * widened only when the standards show, significantly, that it is too narrow (unmodelled
 * curvature, correlation the noise model missed).
 */
import { isBandwrightError } from '../../errors.js';
import { fQuantile } from '../../stats/distributions.js';
import type { ChannelSegment } from './basis.js';
import { fitState, type FittedState } from './fit-state.js';
import {
  DEFAULT_POOR_FIT_RATIO,
  TEST_PROBABILITY,
  type ClsComponent,
  type ClsCrossValidation,
  type ClsTerm,
} from './model.js';
import { predictRaw } from './predict.js';

/** What {@link crossValidate} refits and predicts. */
export interface CrossValidationInput {
  /** Responses of the standards as measured (standards × channels). */
  responses: readonly ArrayLike<number>[];
  /** Baseline-free responses (standards × channels). */
  projected: readonly Float64Array[];
  /** Term values of each standard. */
  design: readonly Float64Array[];
  /** φ-scaled concentrations of each standard (standards × components). */
  scaled: readonly Float64Array[];
  /** φ of each standard. */
  phi: ArrayLike<number>;
  components: readonly ClsComponent[];
  terms: readonly ClsTerm[];
  nuisance: readonly Float64Array[];
  segments: readonly ChannelSegment[];
  /** The calibration's noise correlation (not re-estimated per refit). */
  correlation: readonly number[];
  /** Degrees of freedom of the calibration's residual variance. */
  calibrationDegreesOfFreedom: number;
  channelWord: string;
}

function rootMeanSquare(values: readonly number[]): number | null {
  return values.length > 0 ? Math.sqrt(values.reduce((sum, v) => sum + v * v, 0) / values.length) : null;
}

/**
 * Cross-validates by leaving out each standard in turn.
 *
 * @param input - the standards, the design and the calibration's noise model
 * @returns RMSECV and standardised RMS per component (in the component's unit at the standards'
 *   conditions), the inflation factors and the threshold
 */
export function crossValidate(input: CrossValidationInput): ClsCrossValidation {
  const { components, scaled } = input;
  const n = input.projected.length;
  const p = components.length;
  const errors: number[][] = components.map(() => []);
  const standardized: number[][] = components.map(() => []);
  let predictions = 0;
  for (let left = 0; left < n; left++) {
    const keep = (_: unknown, i: number): boolean => i !== left;
    let reduced: FittedState;
    try {
      reduced = fitState({
        projected: input.projected.filter(keep),
        design: input.design.filter(keep),
        components,
        terms: input.terms,
        nuisance: input.nuisance,
        segments: input.segments,
        correlation: input.correlation,
        conditionLimit: Number.POSITIVE_INFINITY,
        channelWord: input.channelWord,
      });
    } catch (error) {
      if (isBandwrightError(error, 'SINGULAR') || isBandwrightError(error, 'INSUFFICIENT_DATA')) continue;
      throw error;
    }
    const raw = predictRaw(reduced.state, input.responses[left]!, {
      poorFitRatio: DEFAULT_POOR_FIT_RATIO,
      inflate: false,
    });
    predictions++;
    const phi = input.phi[left]!;
    for (let j = 0; j < p; j++) {
      const error = raw.scaled[j]! - scaled[left]![j]!;
      errors[j]!.push(error / phi);
      const se = raw.standardErrors[j]!;
      if (se > 0 && Number.isFinite(se)) standardized[j]!.push(error / se);
    }
  }
  const calibrationDf = input.calibrationDegreesOfFreedom;
  const inflation = standardized.map((values) => {
    if (values.length === 0 || !(calibrationDf > 0)) return 1;
    const meanSquare = values.reduce((sum, v) => sum + v * v, 0) / values.length;
    const limit = fQuantile(TEST_PROBABILITY, values.length, calibrationDf);
    return meanSquare > limit ? Math.sqrt(meanSquare) : 1;
  });
  const thresholdCount = Math.max(...standardized.map((values) => values.length));
  const threshold =
    thresholdCount > 0 && calibrationDf > 0
      ? fQuantile(TEST_PROBABILITY, thresholdCount, calibrationDf)
      : null;
  return {
    predictions,
    rmsecv: errors.map(rootMeanSquare),
    standardizedRms: standardized.map(rootMeanSquare),
    inflation,
    threshold,
  };
}
