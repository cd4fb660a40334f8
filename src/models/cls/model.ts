/**
 * The vocabulary of classical least squares (K-matrix), shared by spectral CLS (`spectral.ts`, a
 * channel is a wavenumber) and band-area CLS (`band.ts`, a channel is a band): components and
 * terms, the fitted model's statistics, and the prediction.
 *
 * Model (DESIGN §3). For standard i with responses a_i (channels) and φ-scaled concentrations
 * u_i = φ_i c_i: a_i = Kᵀ θ(u_i) + U β_i + e_i, where U is an orthonormal nuisance basis (baseline
 * polynomials, background; empty for bands), β_i free, and θ(u) the terms: every component
 * linearly, plus u_s² for the components given a second-order term.
 *
 * A fitted model keeps what was fitted (pure spectra K, (XᵀX)⁻¹ of the concentration design, the
 * channel-noise correlation, ranges, statistics, cross-validation); the prediction operators
 * derived from them are rebuilt once per model when it is first used (`prediction-state.ts`).
 */
import type { ChannelSegment } from './basis.js';

/** Default largest condition number of the column-scaled concentration and pure-spectrum matrices. */
export const DEFAULT_CLS_CONDITION_LIMIT = 1e3;

/**
 * Smallest accepted signal and separation ratio of a component (see
 * {@link ClsCalibrationStatistics.signalRatio}): 1 means noise alone, so 4 asks for a signal,
 * or a difference between two bands, carrying at least three times the noise energy.
 */
export const MINIMUM_SEPARATION_RATIO = 4;

/** Default residual-RMS ratio (sample over calibration) above which a sample can be poor-fit. */
export const DEFAULT_POOR_FIT_RATIO = 1.5;

/**
 * Share of the calibration residual sum of squares a second-order term must remove (besides
 * being significant) for the residual to count as lack of fit: with hundreds of channels an F
 * test finds curvature far too small to matter.
 */
export const SUBSTANTIAL_REDUCTION = 0.1;

/** Probability of the F tests (poor fit, lack of fit, cross-validation inflation). */
export const TEST_PROBABILITY = 0.99;

/** A component of the model: a reported gas or an interferent (modelled, not reported). */
export interface ClsComponent {
  /** Gas name, e.g. `CO`. */
  readonly name: string;
  /** True for gases the result reports; false for interferents such as H2O or CO2. */
  readonly reported: boolean;
  /** Concentration unit of the standards' values, e.g. `ppm`. */
  readonly unit: string;
}

/** The standards of every CLS fit, besides their responses. Nothing here is modified. */
export interface ClsStandards {
  /**
   * Certified concentrations, standards × components, each in its component's unit at the
   * standard's own conditions (≥ 0).
   */
  readonly concentrations: readonly ArrayLike<number>[];
  /** φ = (L/L_ref)(P/P_ref)(T_ref/T) of each standard (> 0). */
  readonly phi: ArrayLike<number>;
  /** Components in column order of `concentrations`: reported gases and interferents. */
  readonly components: readonly ClsComponent[];
  /** Optional label of each standard (e.g. its scan file) for messages. */
  readonly standardLabels?: readonly string[];
}

/** Options of every CLS fit. */
export interface ClsCommonFitOptions {
  /** Names of components given a second-order (quadratic) term, for saturating bands. */
  readonly secondOrder?: readonly string[];
  /** Default confidence level of prediction intervals (default 0.95). */
  readonly level?: number;
  /**
   * Largest condition number of the column-scaled concentration and pure-spectrum (or
   * band-response) matrices (default 1000).
   */
  readonly conditionLimit?: number;
}

/** Options of a CLS prediction, spectral or band-area. */
export interface ClsPredictOptions {
  /** φ = (L/L_ref)(P/P_ref)(T_ref/T) of the sample (> 0). */
  readonly phi: number;
  /** Confidence level of the intervals (default: the model's, usually 0.95). */
  readonly level?: number;
  /**
   * Residual-RMS ratio over the calibration's that a sample must exceed, besides the F test at
   * 99 %, to be flagged `poor-fit` (default 1.5).
   */
  readonly poorFitRatio?: number;
}

/** A term of the design: a component to the first or second power. */
export interface ClsTerm {
  /** Index into the model's components. */
  readonly component: number;
  /** 1 for the linear term, 2 for the second-order term. */
  readonly power: 1 | 2;
}

/** Calibration range of a component, in its unit at reference conditions (φ-scaled). */
export interface ClsRange {
  readonly min: number;
  readonly max: number;
}

/** What the calibration fit says about itself. */
export interface ClsCalibrationStatistics {
  /** Number of standards. */
  readonly standards: number;
  /** Residual variance per channel, corrected for channel correlation (response units²). */
  readonly residualVariance: number;
  /** Plain RMS of the calibration residuals over all standards and channels (response units). */
  readonly residualRms: number;
  /** Expected calibration residual sum of squares in units of σ², (n − q) τ_B. */
  readonly residualCount: number;
  /** Degrees of freedom of the residual variance (Satterthwaite). */
  readonly degreesOfFreedom: number;
  /** Largest |response| of the standards after baseline removal (sets a numerical noise floor). */
  readonly responseScale: number;
  /** Condition number of the column-scaled concentration matrix X (the K fit). */
  readonly conditionConcentrations: number;
  /** Condition number of the column-scaled pure-spectrum matrix Kᵀ (prediction). */
  readonly conditionPureSpectra: number;
  /**
   * Per term, how far the fitted pure spectra stand out of the calibration residual where they
   * lie (1 means residual alone; see the header's "Separation checks"). On a component's linear
   * term: the joint ratio of all its terms (its linear and, if any, second-order pure spectrum);
   * on a second-order term: that term's own ratio (is the curvature distinguishable). Null when
   * the calibration has no residual.
   */
  readonly signalRatio: readonly (number | null)[];
  /**
   * On each component's linear term, the smallest over the other components of: weighted energy
   * of the part of its response spectrum (its secant over the calibrated range) not parallel to
   * the other's, over the residual expected in that difference (about 1 when the two bands have
   * the same shape); null on second-order terms and when not computed.
   */
  readonly separationRatio: readonly (number | null)[];
  /** Whether the residual is noise or lack of fit, and which second-order terms would reduce it. */
  readonly lackOfFit: ClsLackOfFit;
}

/** What a second-order term for one component would do to the calibration residual. */
export interface ClsSecondOrderGain {
  /** Component name. */
  readonly component: string;
  /** Share of the calibration residual sum of squares the term would remove (0…1). */
  readonly residualReduction: number;
  /** F statistic of the added term (residual removed per channel over residual left). */
  readonly fStatistic: number;
  /** F(0.99; ν₁, ν₂) with Satterthwaite degrees of freedom for correlated channels. */
  readonly fLimit: number;
}

/**
 * Lack of fit of the calibration: the residual compared with the noise of the zero-gas
 * standards (blanks), and the residual each missing second-order term would remove.
 */
export interface ClsLackOfFit {
  /** Number of standards with every concentration zero; their spectra hold noise (and baseline) only. */
  readonly blanks: number;
  /** Noise variance per channel from the blanks, correlation-corrected (response units²), or null without blanks. */
  readonly blankVariance: number | null;
  /** Calibration residual variance over the blanks' noise variance, or null without blanks. */
  readonly residualOverBlank: number | null;
  /**
   * F(0.99; ν_residual, ν_blanks): the ratio above which the residual is significantly above
   * noise; null without blanks.
   */
  readonly residualOverBlankLimit: number | null;
  /** For each component without a second-order term whose standards allow one (at least three levels). */
  readonly secondOrderGains: readonly ClsSecondOrderGain[];
  /**
   * True when the residual is lack of fit: significantly and substantially (variance over
   * {@link DEFAULT_POOR_FIT_RATIO}²) above the blanks' noise, or reduced significantly and by at
   * least {@link SUBSTANTIAL_REDUCTION} by a second-order term.
   */
  readonly detected: boolean;
}

/** Leave-one-out cross-validation over the standards. */
export interface ClsCrossValidation {
  /** Standards whose leave-one-out prediction could be made. */
  readonly predictions: number;
  /** Root-mean-square error of cross-validation per component, in its unit (null if none). */
  readonly rmsecv: readonly (number | null)[];
  /** RMS of LOO errors divided by their predicted standard errors, per component (null if none). */
  readonly standardizedRms: readonly (number | null)[];
  /** Interval inflation factor per component (≥ 1). */
  readonly inflation: readonly number[];
  /** Critical value of mean z² above which a component's interval is inflated. */
  readonly threshold: number | null;
}

/**
 * The learned state shared by spectral and band CLS models; plain JSON-safe data holding what was
 * fitted, nothing that can be recomputed from it.
 */
export interface ClsCoreModel {
  /** Components in design order. */
  readonly components: readonly ClsComponent[];
  /** Design terms: the components (power 1) in order, then second-order terms. */
  readonly terms: readonly ClsTerm[];
  /** Number of channels (or bands) a sample must have. */
  readonly channelCount: number;
  /** K: one row per term, responses per φ-scaled unit (per unit² for second-order terms). */
  readonly pureSpectra: readonly (readonly number[])[];
  /** (XᵀX)⁻¹ of the concentration design (terms × terms). */
  readonly concentrationGramInverse: readonly (readonly number[])[];
  /** Noise autocorrelation ρ_0 = 1, ρ_1 … (channels); [1] for independent channels. */
  readonly noiseCorrelation: readonly number[];
  /** Contiguous channel runs along which the correlation acts. */
  readonly segments: readonly ChannelSegment[];
  /** Calibrated range per component, φ-scaled (reference conditions). */
  readonly ranges: readonly ClsRange[];
  /** Fit statistics. */
  readonly calibration: ClsCalibrationStatistics;
  /** Leave-one-out cross-validation and the interval inflation it implies. */
  readonly crossValidation: ClsCrossValidation;
  /** Default confidence level of prediction intervals. */
  readonly level: number;
  /** Things the person calibrating should know (lack of fit and what would remove it). */
  readonly warnings: readonly string[];
}

/** A concentration estimate with its prediction interval. */
export interface ClsEstimate {
  /** Component name. */
  readonly name: string;
  /** Unit, as the standards'. */
  readonly unit: string;
  /** Estimated concentration at the sample's conditions (divided by its φ). */
  readonly value: number;
  /** Standard error of the value, including the calibration term and the inflation factor. */
  readonly se: number;
  /** Lower end of the prediction interval. */
  readonly low: number;
  /** Upper end of the prediction interval. */
  readonly high: number;
  /** `extrapolated` when the φ-scaled value is more than one standard error outside the calibrated range. */
  readonly flags: readonly 'extrapolated'[];
}

/** Flags about the whole prediction. */
export type ClsFlag = 'poor-fit';

/** Result of predicting one sample. */
export interface ClsPrediction {
  /** Reported components, in model order. */
  readonly estimates: readonly ClsEstimate[];
  /** Interferents (modelled, not reported), in model order. */
  readonly interferents: readonly ClsEstimate[];
  /** Plain RMS of the residual over the channels (response units, e.g. absorbance). */
  readonly residualRms: number;
  /** Residual on the model's channels after removing baseline, background and the fitted gases. */
  readonly residual: Float64Array;
  /** `poor-fit` when the residual is significantly and substantially above the calibration's. */
  readonly flags: readonly ClsFlag[];
  /** Sample residual variance over calibration residual variance (both correlation-corrected). */
  readonly fitRatio: number;
  /** Value of {@link ClsPrediction.fitRatio} above which `poor-fit` is set. */
  readonly fitRatioLimit: number;
  /** Degrees of freedom of the t quantile used. */
  readonly degreesOfFreedom: number;
  /** Confidence level of the intervals. */
  readonly level: number;
  /** Gauss–Newton iterations (0 for a linear model). */
  readonly iterations: number;
  /** Non-fatal notes (e.g. Gauss–Newton stopped before converging). */
  readonly warnings: readonly string[];
  /**
   * Channels left out because the sample is undefined there (NaN: saturated); absent when every
   * channel was used. The residual is NaN at those channels.
   */
  readonly undefinedChannels?: number;
}
