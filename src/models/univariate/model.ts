/**
 * Univariate calibration: response y (band area, peak height) against concentration x of
 * certified standards. This module holds the vocabulary — the data, the options and the fitted
 * model, a plain JSON-safe object; `fit.ts` makes it, `predict.ts` inverts it for a sample.
 *
 * Forms (DESIGN §3): straight line y = a + b·x, through the origin y = b·x, second order
 * y = a + b·x + c·x². Weighting: see `weights.ts`.
 */
import type { CalibrationLimits } from '../../stats/detection.js';
import type { MandelResult } from '../../stats/mandel.js';
import { quadraticForm } from '../../stats/linear-algebra.js';

/** Shape of the calibration curve. */
export type CurveForm = 'linear' | 'origin' | 'quadratic';
/** How standards are weighted; see `weights.ts` for the rules. */
export type WeightScheme = 'none' | '1/x' | '1/x2' | 'replicates';

/** All curve forms, for validating options. */
export const CURVE_FORMS: readonly CurveForm[] = ['linear', 'origin', 'quadratic'];
/** All weighting schemes, for validating options. */
export const WEIGHT_SCHEMES: readonly WeightScheme[] = ['none', '1/x', '1/x2', 'replicates'];

/**
 * Largest magnitude of a concentration or response accepted by `fitUnivariate`: squares and
 * sums of squares of n values stay far inside the double range (about 1.8e308).
 */
export const MAX_MAGNITUDE = 1e100;

/** Standards: certified concentrations and their measured responses, pairwise. */
export interface UnivariateData {
  /** Certified concentration of each standard (calibration unit, e.g. ppm), ≥ 0. Replicates repeat a value. */
  concentration: readonly number[];
  /** Response of each standard (band area in cm⁻¹·absorbance, or peak height in absorbance), reference conditions. */
  response: readonly number[];
}

/** Options of `fitUnivariate`. */
export interface UnivariateFitOptions {
  /** Curve form. */
  form: CurveForm;
  /** Weighting scheme (default `none`). */
  weights?: WeightScheme;
  /** Risk α for decision and detection limits, 0 < α < 0.5 (default 0.05). */
  alpha?: number;
  /** Concentration floor for `1/x` and `1/x2` weights, > 0 (default: the lowest non-zero concentration). */
  weightFloor?: number;
}

/** Replicate statistics at one concentration level (for `replicates` weighting). */
export interface ReplicateLevel {
  /** The level's concentration. */
  concentration: number;
  /** Number of replicate standards at it. */
  count: number;
  /** SD of their responses. */
  sd: number;
}

/** How the fit was weighted, with everything needed to evaluate w(x) anywhere. */
export interface Weighting {
  /** The scheme. */
  scheme: WeightScheme;
  /** Floor concentration for `1/x` and `1/x2`, else null. */
  floor: number | null;
  /** Normalising factor: w(x) = scale·raw(x) so that Σw = n over the standards. */
  scale: number;
  /** Level SDs for `replicates`, else null. */
  levels: ReplicateLevel[] | null;
  /** The rule, in words. */
  rule: string;
}

/** Coefficients in original units: y = a + b·x + c·x² (a = 0 through origin, c = 0 for straight lines). */
export interface Coefficients {
  /** Intercept, response units. */
  a: number;
  /** Slope (linear term), response units per concentration unit. */
  b: number;
  /** Second-order term, response units per concentration unit². */
  c: number;
}

/**
 * A fitted univariate calibration. Plain JSON-safe data (numbers, strings, arrays, null): it can be
 * written to a calibration file and read back unchanged.
 */
export interface UnivariateModel {
  /** Discriminator for calibration files. */
  kind: 'univariate';
  /** Curve form. */
  form: CurveForm;
  /** Weighting scheme. */
  weights: WeightScheme;
  /** Weighting details. */
  weighting: Weighting;
  /** Which of a, b, c were estimated (the others are fixed at 0). */
  parameters: ('a' | 'b' | 'c')[];
  /** Coefficients in original units. */
  coefficients: Coefficients;
  /** Standard errors of a, b, c (0 for a fixed term). */
  standardErrors: Coefficients;
  /** 3 × 3 covariance of (a, b, c) in original units; rows and columns of fixed terms are 0. */
  covariance: number[][];
  /** Residual SD s (response units; for weighted fits, of a response with weight 1). */
  residualSD: number;
  /** Residual degrees of freedom n − p. */
  degreesOfFreedom: number;
  /** Number of standards n. */
  standards: number;
  /** Σw over the standards (= n after normalisation). */
  sumWeights: number;
  /** Weighted mean concentration x̄. */
  meanX: number;
  /** Sxx = Σw(x − x̄)², concentration units². */
  sxx: number;
  /** Σw·x², concentration units² (the through-origin form's spread). */
  sumXSquared: number;
  /** Weighted mean response ȳ. */
  meanResponse: number;
  /** R²: centred with an intercept, uncentred (1 − RSS/Σwy²) through the origin. */
  rSquared: number;
  /** Which R² definition. */
  rSquaredKind: 'centred' | 'uncentred';
  /** Condition number of the scaled design the fit solved. */
  conditionNumber: number;
  /** Residuals y − ŷ of the standards, response units, in input order. */
  residuals: number[];
  /** The standards the model was fitted to (for plots and rechecks). */
  data: { concentration: number[]; response: number[] };
  /** Calibrated range [lowest, highest] concentration of the standards. */
  range: [number, number];
  /** Distinct concentration levels, ascending. */
  levels: number[];
  /** Mandel's fitting test (linear vs second order, same weights), or null when n < 4 or fewer than 3 levels. */
  mandel: MandelResult | null;
  /** Decision, detection and determination limits with their definitions. */
  limits: CalibrationLimits;
  /** α used for the limits. */
  alpha: number;
  /** Things a person should know about this calibration, in words. */
  warnings: string[];
}

/**
 * Variance of the fitted response at x, gᵀ·Cov·g with g = (1, x, x²), never below 0.
 *
 * @param covariance - 3 × 3 covariance of (a, b, c)
 * @param x - concentration, calibration units
 */
export function fittedVarianceAt(covariance: readonly (readonly number[])[], x: number): number {
  return Math.max(0, quadraticForm(covariance, [1, x, x * x]));
}
