/**
 * The shared core of classical least squares (K-matrix), used by spectral CLS (`cls.ts`, a
 * channel is a wavenumber) and band-area CLS (`band-cls.ts`, a channel is a band).
 *
 * Model (DESIGN §3). For standard i with responses a_i (channels) and φ-scaled concentrations
 * u_i = φ_i c_i: a_i = Kᵀ θ(u_i) + U β_i + e_i, where U is an orthonormal nuisance basis (baseline
 * polynomials, background; empty for bands), β_i free, and θ(u) the terms: every component
 * linearly, plus u_s² for the components given a second-order term.
 *
 * Fit. Y = A − (A U) Uᵀ removes the nuisance. K = argmin ‖Y − X K‖ with X = [θ(u_i)ᵀ] by QR
 * (`solveLeastSquaresMany`, which refuses a rank-deficient or ill-conditioned X and names the
 * collinear components).
 *
 * Separation checks. The pure-spectrum matrix Kᵀ must have a column-scaled condition number within
 * the limit; then each component's spectrum, and the difference between each pair, must stand out
 * of the error the calibration leaves in them. That error is not spread evenly over the channels
 * when the residual is lack of fit (saturated lines, lines of different gases overlapping in
 * transmittance) or when noise grows where the standards absorb; since K̂ is fitted channel by
 * channel, its error at channel j is s² h_j (XᵀX)⁻¹, with h_j the residual energy of the
 * standards in a 17-channel window around j relative to its mean (h ≡ 1 for bands). The signal
 * ratio of a component with terms T is the Wald statistic Σ_j k_Tjᵀ [(XᵀX)⁻¹_TT]⁻¹ k_Tj / h_j over
 * s² τ_B |T|: about 1 for a spectrum that is residual alone. A component with a second-order term
 * is judged on both terms jointly: over standards that start at zero, u and u² are nearly
 * collinear, so neither pure spectrum alone is well determined even when the pair is. The
 * separation ratio of two components compares their response spectra v = k₁ + u_max k₂ (the
 * secant over the calibrated range, the slope at mid-range; v = k₁ for a linear component) in the
 * same weighted metric: energy of the part of v_a not parallel to v_b over the error expected in
 * v_a − λ v_b. Both ratios must reach {@link MINIMUM_SEPARATION_RATIO}; with an even residual they
 * reduce to unweighted energies against s² (XᵀX)⁻¹ τ_B.
 *
 * Lack of fit. The residual variance is compared with the noise of the zero-gas standards (blanks:
 * every concentration zero, so their baseline-free spectra are noise) by an F test, and each
 * component without a second-order term is refitted with one to see how much residual it removes
 * (F test on the removed sum of squares, Satterthwaite degrees of freedom). When a separation
 * check fails and the residual is lack of fit, the fit is repeated with the second-order terms
 * that remove it: if the component then passes, the refusal says it is masked by lack of fit and
 * names the terms to add; if it still fails, the refusal says it does not absorb measurably (or
 * the bands coincide). Without lack of fit the refusal is the plain one (noise). A calibration
 * that passes carries the diagnosis as a warning.
 *
 * Predict. θ̂ = M y with M = (Kᵀ)⁺ = R_K⁻¹ Q_Kᵀ precomputed (one matrix–vector product a scan).
 * With second-order terms, ĉ minimises ‖y − Kᵀθ(c)‖ by Gauss–Newton from θ̂'s linear part,
 * entirely in the q-dimensional space of Kᵀ's columns: with z = Q_Kᵀ y = R_K θ̂, ‖y − Kᵀθ(c)‖² =
 * ‖y‖² − ‖z‖² + ‖z − R_K θ(c)‖², so each iteration is a q × p problem.
 *
 * Uncertainty. Delta method with the calibration term of the textbook CLS formula:
 * Cov(ĉ) = s² (1 + θ(ĉ)ᵀ (XᵀX)⁻¹ θ(ĉ)) · J⁺ R J⁺ᵀ, J = ∂(Kᵀθ)/∂c at ĉ (J = Kᵀ when linear),
 * R the channel-noise correlation matrix estimated from the calibration residuals
 * (`cls-noise.ts`; R = I reproduces the textbook σ̂² (K Kᵀ)⁻¹ (1 + ĉᵀ (CᵀC)⁻¹ ĉ)). In the reduced
 * space J⁺ R J⁺ᵀ = G W Gᵀ with G = (R_K D)⁺, D = ∂θ/∂c and W = Q_Kᵀ R Q_K precomputed.
 * s² pools the sample's residual with the calibration's, each divided by its expected sum of
 * squares under R: E‖y − Kᵀθ̂‖² = σ² τ_s with τ_s = N − Σ_U uᵀRu − tr W, and for the calibration
 * (n − q) τ_B with τ_B = N − Σ_U uᵀRu; degrees of freedom by Satterthwaite, ν ≈ τ/Σρ_l².
 * When the sample is flagged poor-fit, s² is the sample's own (its noise is not the
 * calibration's). Finally each component's standard error is multiplied by an inflation factor
 * from leave-one-out cross-validation: with z the LOO errors divided by their predicted standard
 * errors, the factor is sqrt(mean z²) when mean z² exceeds F(0.99; m, ν_cal) (m LOO predictions)
 * and 1 otherwise — so an interval is widened only when the standards show, significantly, that
 * it is too narrow (unmodelled curvature, correlation the noise model missed).
 *
 * Poor fit. Sample residual variance over calibration residual variance above both
 * F(0.99; ν_s, ν_cal) and {@link DEFAULT_POOR_FIT_RATIO}² (residual RMS 1.5 times the
 * calibration's): an unmodelled absorber or a different instrument state.
 */
import { Matrix, QrDecomposition, SingularValueDecomposition } from 'ml-matrix';
import { BandwrightError, isBandwrightError } from '../errors.js';
import { solveLeastSquaresMany } from '../stats/least-squares.js';
import { criticalT, fQuantile } from '../stats/distributions.js';
import type { ChannelSegment } from './cls-basis.js';
import { removeSpan } from './cls-basis.js';
import { correlationSquareSum, estimateCorrelation, multiplyCorrelation } from './cls-noise.js';

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

/**
 * Half-width, in channels, of the moving window over which the calibration residual's energy is
 * averaged to weight the separation checks (17 channels × the standards' residual degrees of
 * freedom: enough for a stable local level, narrow enough to follow single lines' lack of fit).
 */
const RESIDUAL_PROFILE_HALF_WIDTH = 8;

/** Smallest local residual level, relative to the mean, used as a weight (keeps weights finite). */
const RESIDUAL_PROFILE_FLOOR = 1e-4;

/** Probability of the F tests (poor fit, cross-validation inflation). */
const TEST_PROBABILITY = 0.99;

/** A component of the model: a reported gas or an interferent (modelled, not reported). */
export interface ClsComponent {
  /** Gas name, e.g. `CO`. */
  readonly name: string;
  /** True for gases the result reports; false for interferents such as H2O or CO2. */
  readonly reported: boolean;
  /** Concentration unit of the standards' values, e.g. `ppm`. */
  readonly unit: string;
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
  /** F(0.99; ν_residual, ν_blanks): the ratio above which the residual is significantly above noise; null without blanks. */
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

/** The learned state shared by spectral and band CLS models; plain JSON-safe data. */
export interface ClsCoreModel {
  /** Components in design order. */
  readonly components: readonly ClsComponent[];
  /** Design terms: the components (power 1) in order, then second-order terms. */
  readonly terms: readonly ClsTerm[];
  /** Number of channels (or bands) a sample must have. */
  readonly channelCount: number;
  /** K: one row per term, responses per φ-scaled unit (per unit² for second-order terms). */
  readonly pureSpectra: readonly (readonly number[])[];
  /** (Kᵀ)⁺, one row per term: θ̂ = M a. */
  readonly predictionMatrix: readonly (readonly number[])[];
  /** R_K of the QR factorisation Kᵀ = Q_K R_K (terms × terms, upper triangular). */
  readonly responseFactor: readonly (readonly number[])[];
  /** W = Q_Kᵀ R Q_K (terms × terms), the noise correlation seen by the estimates. */
  readonly noiseGram: readonly (readonly number[])[];
  /** (XᵀX)⁻¹ of the concentration design (terms × terms). */
  readonly concentrationGramInverse: readonly (readonly number[])[];
  /** Noise autocorrelation ρ_0 = 1, ρ_1 … (channels); [1] for independent channels. */
  readonly noiseCorrelation: readonly number[];
  /** Contiguous channel runs along which the correlation acts. */
  readonly segments: readonly ChannelSegment[];
  /** Expected residual sum of squares of a sample, in units of σ² (τ_s). */
  readonly sampleResidualCount: number;
  /** Degrees of freedom of a sample's residual variance (Satterthwaite). */
  readonly sampleDegreesOfFreedom: number;
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
}

/**
 * Numeric state used for prediction (typed arrays and derived factors), built once from a model
 * by {@link prepareClsState} or during fitting; the symbols are those of this module's header.
 */
export interface ClsState {
  readonly componentCount: number;
  readonly terms: readonly ClsTerm[];
  readonly pureSpectra: readonly Float64Array[];
  readonly predictionMatrix: readonly Float64Array[];
  readonly responseFactor: readonly (readonly number[])[];
  readonly noiseGram: readonly (readonly number[])[];
  readonly concentrationGramInverse: readonly (readonly number[])[];
  /** R_K⁻¹ W R_K⁻ᵀ, the linear-model J⁺ R J⁺ᵀ. */
  readonly linearCovarianceFactor: readonly (readonly number[])[];
  readonly nuisance: readonly Float64Array[];
  readonly calibrationResidualSum: number;
  readonly calibrationResidualCount: number;
  readonly calibrationDegreesOfFreedom: number;
  readonly sampleResidualCount: number;
  readonly sampleDegreesOfFreedom: number;
  readonly inflation: readonly number[];
  readonly responseScale: number;
}

/** Raw prediction in φ-scaled units, before splitting into reported and interferent components. */
interface RawPrediction {
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

// ---------------------------------------------------------------------------------------------
// Small dense helpers (q ≤ a dozen: plain arrays)

function identity(size: number): number[][] {
  return Array.from({ length: size }, (_, i) => Array.from({ length: size }, (_, j) => (i === j ? 1 : 0)));
}

function toArrays(matrix: Matrix): number[][] {
  return matrix.to2DArray();
}

function multiplyMatrices(a: readonly (readonly number[])[], b: readonly (readonly number[])[]): number[][] {
  const rows = a.length;
  const inner = b.length;
  const columns = b[0]?.length ?? 0;
  const out: number[][] = [];
  for (let i = 0; i < rows; i++) {
    const row = new Array<number>(columns).fill(0);
    for (let k = 0; k < inner; k++) {
      const factor = a[i]![k]!;
      if (factor === 0) continue;
      for (let j = 0; j < columns; j++) row[j]! += factor * b[k]![j]!;
    }
    out.push(row);
  }
  return out;
}

function transpose(a: readonly (readonly number[])[]): number[][] {
  const rows = a.length;
  const columns = a[0]?.length ?? 0;
  return Array.from({ length: columns }, (_, j) => Array.from({ length: rows }, (_, i) => a[i]![j]!));
}

function invertUpperTriangular(r: readonly (readonly number[])[]): number[][] {
  const size = r.length;
  const inverse = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let j = size - 1; j >= 0; j--) {
    inverse[j]![j] = 1 / r[j]![j]!;
    for (let i = j - 1; i >= 0; i--) {
      let sum = 0;
      for (let k = i + 1; k <= j; k++) sum += r[i]![k]! * inverse[k]![j]!;
      inverse[i]![j] = -sum / r[i]![i]!;
    }
  }
  return inverse;
}

function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < a.length; i++) sum += a[i]! * b[i]!;
  return sum;
}

function quadraticForm(matrix: readonly (readonly number[])[], v: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < v.length; i++) for (let j = 0; j < v.length; j++) sum += v[i]! * matrix[i]![j]! * v[j]!;
  return sum;
}

function formatNumber(value: number): string {
  if (!Number.isFinite(value)) return 'infinite';
  const size = Math.abs(value);
  return size >= 1e5 || (size < 1e-2 && value !== 0)
    ? value.toExponential(1).replace('e+', 'e')
    : String(Number(value.toPrecision(3)));
}

/** "CO", "CO and N2O", "CO, N2O and H2O" */
export function listNames(names: readonly string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]!}`;
}

/** Name of a term for messages: `CO`, or `CO (second-order term)`. */
function termName(components: readonly ClsComponent[], term: ClsTerm): string {
  const name = components[term.component]!.name;
  return term.power === 1 ? name : `${name} (second-order term)`;
}

/** θ(c): the term values of concentrations c. */
function termValues(terms: readonly ClsTerm[], c: ArrayLike<number>): Float64Array {
  const theta = new Float64Array(terms.length);
  terms.forEach((term, t) => {
    const value = c[term.component]!;
    theta[t] = term.power === 1 ? value : value * value;
  });
  return theta;
}

// ---------------------------------------------------------------------------------------------
// Fitting

/** Options of {@link fitClsCore}. */
export interface ClsCoreOptions {
  /** Confidence level stored as the model's default. */
  readonly level: number;
  /** Largest condition number accepted for the column-scaled X and Kᵀ. */
  readonly conditionLimit: number;
  /** Indices of components that get a second-order term. */
  readonly secondOrder: readonly number[];
  /** Orthonormal nuisance basis on the channels (may be empty). */
  readonly nuisance: readonly Float64Array[];
  /** Channel segments for the noise correlation; estimate correlation only when `estimateCorrelation`. */
  readonly segments: readonly ChannelSegment[];
  /** Estimate channel-noise correlation from the residuals (spectra); false for independent bands. */
  readonly estimateCorrelation: boolean;
  /**
   * Weight the separation checks by the local level of the calibration residual (spectra, whose
   * neighbouring channels share a level); false to pool it over all channels (bands).
   */
  readonly localResidualWeights: boolean;
  /** What to call a channel in messages (`channel`, `band`). */
  readonly channelWord: string;
}

/** Validated input of {@link fitClsCore}; arrays are not modified. */
export interface ClsCoreData {
  /** Responses, standards × channels. */
  readonly responses: readonly ArrayLike<number>[];
  /** Certified concentrations, standards × components (at the standards' own conditions). */
  readonly concentrations: readonly ArrayLike<number>[];
  /** φ of each standard. */
  readonly phi: ArrayLike<number>;
  /** Components. */
  readonly components: readonly ClsComponent[];
}

interface StateInput {
  projected: readonly Float64Array[];
  design: readonly Float64Array[];
  components: readonly ClsComponent[];
  terms: readonly ClsTerm[];
  nuisance: readonly Float64Array[];
  segments: readonly ChannelSegment[];
  /** Noise correlation to use, or `estimate` to estimate it from this fit's residuals. */
  correlation: readonly number[] | 'estimate';
  conditionLimit: number;
  channelWord: string;
}

interface FittedState {
  state: ClsState;
  residuals: Float64Array[];
  conditionConcentrations: number;
  rFactor: number[][];
  correlation: number[];
}

/**
 * Fits K for given projected responses and design and builds the prediction state. Refuses
 * (via the shared least-squares engine) a design that cannot separate the terms.
 */
function fitState(input: StateInput): FittedState {
  const { projected, design, components, terms, nuisance, segments } = input;
  const n = projected.length;
  const q = terms.length;
  const channels = projected[0]!.length;
  const names = terms.map((term) => termName(components, term));
  const fit = solveLeastSquaresMany(
    design.map((row) => Array.from(row)),
    projected.map((row) => Array.from(row)),
    { columnNames: names, conditionLimit: input.conditionLimit },
  );
  const pureSpectra = fit.coefficients.map((row) => Float64Array.from(row));
  const residuals = projected.map((row, i) => {
    const out = Float64Array.from(row);
    const x = design[i]!;
    for (let t = 0; t < q; t++) {
      const value = x[t]!;
      if (value === 0) continue;
      const k = pureSpectra[t]!;
      for (let j = 0; j < channels; j++) out[j]! -= value * k[j]!;
    }
    return out;
  });
  const calibrationResidualSum = fit.residualSumOfSquares.reduce((a, b) => a + b, 0);
  const correlation =
    input.correlation === 'estimate'
      ? estimateCorrelation(residuals, segments, { independentFraction: (n - q) / n })
      : input.correlation.slice();

  // Pseudo-inverse of Kᵀ by Householder QR, directly with ml-matrix: the shared solver returns
  // coefficients for given right-hand sides, whereas here the operator (Kᵀ)⁺ itself is kept so
  // that each later scan costs one matrix–vector product.
  const kt = new Matrix(channels, q);
  for (let t = 0; t < q; t++) {
    const k = pureSpectra[t]!;
    for (let j = 0; j < channels; j++) kt.set(j, t, k[j]!);
  }
  const qr = new QrDecomposition(kt);
  const rFactor = toArrays(qr.upperTriangularMatrix);
  const qFactor = qr.orthogonalMatrix;
  const rankOk = rFactor.every((row, t) => Number.isFinite(1 / row[t]!) && row[t] !== 0);
  if (!rankOk) {
    throw new BandwrightError(
      'SINGULAR',
      `pure spectra of ${listNames(names)} are linearly dependent over the ${input.channelWord}s`,
      {
        parameter: 'spectra',
      },
    );
  }
  const rInverse = invertUpperTriangular(rFactor);
  const predictionMatrix: Float64Array[] = [];
  for (let t = 0; t < q; t++) predictionMatrix.push(new Float64Array(channels));
  for (let j = 0; j < channels; j++) {
    for (let t = 0; t < q; t++) {
      // M = R⁻¹ Qᵀ; R⁻¹ upper triangular.
      let sum = 0;
      for (let k = t; k < q; k++) sum += rInverse[t]![k]! * qFactor.get(j, k);
      predictionMatrix[t]![j] = sum;
    }
  }

  // W = Q_Kᵀ R Q_K and the expected residual counts under the noise correlation.
  const correlatedQ: Float64Array[] = [];
  for (let t = 0; t < q; t++) {
    const column = new Float64Array(channels);
    for (let j = 0; j < channels; j++) column[j] = qFactor.get(j, t);
    correlatedQ.push(column);
  }
  const rq = correlatedQ.map((column) => multiplyCorrelation(column, correlation, segments));
  const noiseGram = correlatedQ.map((column) => rq.map((other) => dot(column, other)));
  let nuisanceCorrelationSum = 0;
  for (const u of nuisance) nuisanceCorrelationSum += dot(u, multiplyCorrelation(u, correlation, segments));
  const squareSum = correlationSquareSum(correlation);
  const baseCount = channels - nuisanceCorrelationSum;
  let traceW = 0;
  for (let t = 0; t < q; t++) traceW += noiseGram[t]![t]!;
  const sampleResidualCount = baseCount - traceW;
  const calibrationResidualCount = (n - q) * baseCount;
  const linearCovarianceFactor = multiplyMatrices(multiplyMatrices(rInverse, noiseGram), transpose(rInverse));

  let responseScale = 0;
  for (const row of projected)
    for (let j = 0; j < channels; j++) responseScale = Math.max(responseScale, Math.abs(row[j]!));

  const state: ClsState = {
    componentCount: components.length,
    terms,
    pureSpectra,
    predictionMatrix,
    responseFactor: rFactor,
    noiseGram,
    concentrationGramInverse: fit.unscaledCovariance,
    linearCovarianceFactor,
    nuisance,
    calibrationResidualSum,
    calibrationResidualCount,
    calibrationDegreesOfFreedom: calibrationResidualCount / squareSum,
    sampleResidualCount,
    sampleDegreesOfFreedom: sampleResidualCount / squareSum,
    inflation: new Array<number>(components.length).fill(1),
    responseScale,
  };
  return { state, residuals, conditionConcentrations: fit.conditionNumber, rFactor, correlation };
}

interface PureSpectrumChecks {
  condition: number;
  signalRatio: (number | null)[];
  separationRatio: (number | null)[];
}

/** What {@link checkPureSpectra} needs beyond the fitted state. */
interface CheckInput {
  fitted: FittedState;
  projected: readonly Float64Array[];
  nuisance: readonly Float64Array[];
  design: readonly Float64Array[];
  components: readonly ClsComponent[];
  terms: readonly ClsTerm[];
  segments: readonly ChannelSegment[];
  conditionLimit: number;
  channelWord: string;
  localWeights: boolean;
  lackOfFit: ClsLackOfFit;
}

/**
 * Relative residual level h_j per channel: the standards' residual energy averaged over a window
 * of ±{@link RESIDUAL_PROFILE_HALF_WIDTH} channels inside the channel's segment, divided by its
 * mean over the channels; all ones when `local` is false.
 */
function residualProfile(
  residuals: readonly Float64Array[],
  segments: readonly ChannelSegment[],
  channels: number,
  local: boolean,
): Float64Array {
  const profile = new Float64Array(channels).fill(1);
  if (!local) return profile;
  const energy = new Float64Array(channels);
  for (const row of residuals) for (let j = 0; j < channels; j++) energy[j]! += row[j]! * row[j]!;
  for (const segment of segments) {
    for (let j = segment.start; j < segment.end; j++) {
      const from = Math.max(segment.start, j - RESIDUAL_PROFILE_HALF_WIDTH);
      const to = Math.min(segment.end - 1, j + RESIDUAL_PROFILE_HALF_WIDTH);
      let sum = 0;
      for (let k = from; k <= to; k++) sum += energy[k]!;
      profile[j] = sum / (to - from + 1);
    }
  }
  let mean = 0;
  for (let j = 0; j < channels; j++) mean += profile[j]!;
  mean /= channels;
  if (!(mean > 0)) return profile.fill(1);
  for (let j = 0; j < channels; j++) profile[j] = Math.max(profile[j]! / mean, RESIDUAL_PROFILE_FLOOR);
  return profile;
}

/**
 * Refuses pure spectra that cannot be separated: an ill-conditioned column-scaled Kᵀ, a
 * component whose spectrum does not stand out of the calibration residual, or two components
 * whose response spectra differ only by residual (see the header, "Separation checks"). When the
 * residual is lack of fit, the message says so, and whether the second-order terms that would
 * remove it also make the component distinguishable.
 */
function checkPureSpectra(input: CheckInput): PureSpectrumChecks {
  const { fitted, components, terms, conditionLimit, channelWord } = input;
  const { rFactor } = fitted;
  const q = terms.length;
  const names = terms.map((term) => termName(components, term));
  const columnNorms = Array.from({ length: q }, (_, t) =>
    Math.sqrt(rFactor.reduce((sum, row) => sum + row[t]! * row[t]!, 0)),
  );
  const zero = columnNorms.findIndex((norm) => !(norm > 0));
  if (zero >= 0) {
    throw new BandwrightError(
      'SINGULAR',
      `pure spectrum of ${names[zero]!} is zero on every ${channelWord}: it has no absorption in the method's ${channelWord}s`,
      { parameter: 'spectra' },
    );
  }
  let condition = 1;
  if (q > 1) {
    const scaled = new Matrix(q, q);
    for (let i = 0; i < q; i++)
      for (let t = 0; t < q; t++) scaled.set(i, t, rFactor[i]![t]! / columnNorms[t]!);
    const svd = new SingularValueDecomposition(scaled, { computeLeftSingularVectors: false });
    const singular = svd.diagonal;
    const largest = Math.max(...singular);
    const smallest = Math.min(...singular);
    condition = smallest > 0 ? largest / smallest : Number.POSITIVE_INFINITY;
    if (!(condition <= conditionLimit)) {
      const v = svd.rightSingularVectors;
      const smallestIndex = singular.indexOf(smallest);
      const magnitudes = names.map((_, t) => Math.abs(v.get(t, smallestIndex)));
      const biggest = Math.max(...magnitudes);
      let involved = names.map((_, t) => t).filter((t) => magnitudes[t]! >= 0.25 * biggest);
      if (involved.length < 2)
        involved = names
          .map((_, t) => t)
          .sort((a, b) => magnitudes[b]! - magnitudes[a]!)
          .slice(0, 2)
          .sort((a, b) => a - b);
      throw new BandwrightError(
        'SINGULAR',
        `pure spectra of ${listNames(involved.map((t) => names[t]!))} nearly coincide over the method's ${channelWord}s (condition number ${formatNumber(condition)} of the column-scaled pure-spectrum matrix, limit ${formatNumber(conditionLimit)}): their bands cannot be separated; extend the regions to where their bands differ, or drop one of them`,
        { parameter: 'spectra' },
      );
    }
  }

  const ratios = separationRatios(input);
  const weak = ratios.components.find(
    (entry) => entry.signal !== null && entry.signal < MINIMUM_SEPARATION_RATIO,
  );
  if (weak !== undefined) throw signalRefusal(input, weak.component, weak.signal!);
  const alike = ratios.pairs.find((pair) => pair.ratio < MINIMUM_SEPARATION_RATIO);
  if (alike !== undefined) throw shapeRefusal(input, alike.component, alike.other, alike.ratio);

  const signalRatio: (number | null)[] = new Array<number | null>(q).fill(null);
  const separationRatio: (number | null)[] = new Array<number | null>(q).fill(null);
  for (const entry of ratios.components) {
    const block = termsOf(terms, entry.component);
    signalRatio[block[0]!] = entry.signal;
    separationRatio[block[0]!] = entry.separation;
    block.slice(1).forEach((t, k) => (signalRatio[t] = entry.secondOrderSignal[k] ?? null));
  }
  return { condition, signalRatio, separationRatio };
}

/** Indices of a component's terms: its linear term first, then its second-order term if any. */
function termsOf(terms: readonly ClsTerm[], component: number): number[] {
  return terms.map((term, t) => (term.component === component ? t : -1)).filter((t) => t >= 0);
}

/** Signal and separation ratios of every component (see the header); nothing is thrown. */
interface SeparationRatios {
  components: {
    component: number;
    signal: number | null;
    secondOrderSignal: (number | null)[];
    separation: number | null;
  }[];
  /** Pairs (component, other) with their separation ratio, in the order they are checked. */
  pairs: { component: number; other: number; ratio: number }[];
}

function separationRatios(
  input: Pick<CheckInput, 'fitted' | 'design' | 'components' | 'terms' | 'segments' | 'localWeights'>,
): SeparationRatios {
  const { fitted, components, terms } = input;
  const { state } = fitted;
  const q = terms.length;
  const p = components.length;
  const channels = state.pureSpectra[0]!.length;
  const n = fitted.residuals.length;
  const variance =
    state.calibrationResidualCount > 0 ? state.calibrationResidualSum / state.calibrationResidualCount : 0;
  if (!(variance > 0)) {
    return {
      components: components.map((_, c) => ({
        component: c,
        signal: null,
        secondOrderSignal: termsOf(terms, c)
          .slice(1)
          .map(() => null),
        separation: null,
      })),
      pairs: [],
    };
  }
  const baseCount = state.calibrationResidualCount / (n - q);
  const gram = state.concentrationGramInverse;
  // Weighted (1/h) inner products of the pure spectra, terms × terms.
  const profile = residualProfile(fitted.residuals, input.segments, channels, input.localWeights);
  const products = Array.from({ length: q }, () => new Array<number>(q).fill(0));
  for (let a = 0; a < q; a++) {
    const ka = state.pureSpectra[a]!;
    for (let b = a; b < q; b++) {
      const kb = state.pureSpectra[b]!;
      let sum = 0;
      for (let j = 0; j < channels; j++) sum += (ka[j]! * kb[j]!) / profile[j]!;
      products[a]![b] = products[b]![a] = sum;
    }
  }
  const bilinear = (
    a: readonly number[],
    matrix: readonly (readonly number[])[],
    b: readonly number[],
  ): number => {
    let sum = 0;
    for (let i = 0; i < q; i++)
      if (a[i] !== 0) for (let k = 0; k < q; k++) sum += a[i]! * matrix[i]![k]! * b[k]!;
    return sum;
  };
  // Response spectra as combinations of the term rows: k₁ + u_max k₂.
  const combinations = components.map((_, c) => {
    const a = new Array<number>(q).fill(0);
    let top = 0;
    for (const row of input.design) top = Math.max(top, row[c]!);
    for (const t of termsOf(terms, c)) a[t] = terms[t]!.power === 1 ? 1 : top;
    return a;
  });
  const pairs: SeparationRatios['pairs'] = [];
  const entries = components.map((_, c) => {
    const block = termsOf(terms, c);
    // Wald energy Σ_j k_Tᵀ G_TT⁻¹ k_T / h_j per term.
    const inverse = solveSmall(
      block.map((a) => block.map((b) => gram[a]![b]!)),
      identity(block.length),
    );
    let energy = 0;
    block.forEach((a, i) => block.forEach((b, k) => (energy += inverse[i]![k]! * products[a]![b]!)));
    const signal = energy / block.length / (variance * baseCount);
    const secondOrderSignal = block
      .slice(1)
      .map((t) => products[t]![t]! / (variance * gram[t]![t]! * baseCount));
    let separation: number | null = null;
    const va = combinations[c]!;
    for (let other = 0; other < p; other++) {
      if (other === c) continue;
      // Part of v_a not parallel to v_b over the error expected in v_a − λ v_b.
      const vb = combinations[other]!;
      const lambda = bilinear(va, products, vb) / bilinear(vb, products, vb);
      const difference = bilinear(va, products, va) - lambda * bilinear(va, products, vb);
      const combined = va.map((value, i) => value - lambda * vb[i]!);
      const noise = variance * baseCount * bilinear(combined, gram, combined);
      if (!(noise > 0)) continue;
      const ratio = difference / noise;
      pairs.push({ component: c, other, ratio });
      if (separation === null || ratio < separation) separation = ratio;
    }
    return { component: c, signal, secondOrderSignal, separation };
  });
  return { components: entries, pairs };
}

/**
 * The same fit with second-order terms for the components whose curvature makes the lack of fit,
 * and its separation ratios; null when there are none, too few standards, or the fit fails.
 */
function withHelpfulSecondOrder(input: CheckInput): { names: string[]; ratios: SeparationRatios } | null {
  const helpful = helpfulGains(input.lackOfFit);
  if (helpful.length === 0) return null;
  const added = helpful.map((gain) =>
    input.components.findIndex((component) => component.name === gain.component),
  );
  const terms: ClsTerm[] = [...input.terms, ...added.map((component) => ({ component, power: 2 as const }))];
  const design = input.design.map((row) =>
    Float64Array.from([...Array.from(row), ...added.map((component) => row[component]! * row[component]!)]),
  );
  if (input.projected.length < terms.length + 1) return null;
  try {
    const fitted = fitState({
      projected: input.projected,
      design,
      components: input.components,
      terms,
      nuisance: input.nuisance,
      segments: input.segments,
      correlation: 'estimate',
      conditionLimit: input.conditionLimit,
      channelWord: input.channelWord,
    });
    return {
      names: helpful.map((gain) => gain.component),
      ratios: separationRatios({ ...input, fitted, design, terms }),
    };
  } catch (error) {
    if (isBandwrightError(error, 'SINGULAR') || isBandwrightError(error, 'INSUFFICIENT_DATA')) return null;
    throw error;
  }
}

/** The refusal of a component whose spectrum does not stand out of the calibration residual. */
function signalRefusal(input: CheckInput, component: number, ratio: number): BandwrightError {
  const { components, terms, channelWord, lackOfFit } = input;
  const name = components[component]!.name;
  const subject = `pure spectrum of ${name}${termsOf(terms, component).length > 1 ? ' (first and second order together)' : ''}`;
  const measured = `signal ${formatNumber(ratio)} times the energy the calibration residual leaves in it where it absorbs, must be >= ${MINIMUM_SEPARATION_RATIO}`;
  const absent = `it does not absorb measurably in the method's ${channelWord}s, or its standards are too weak`;
  if (!lackOfFit.detected) {
    return new BandwrightError(
      'SINGULAR',
      `${subject} is not distinguishable from the calibration noise (${measured}): ${absent}`,
      { parameter: 'spectra' },
    );
  }
  const diagnosis = describeLackOfFit(lackOfFit, input.fitted.state);
  const remedy = withHelpfulSecondOrder(input);
  if (remedy !== null) {
    const after = remedy.ratios.components[component]!.signal;
    if (after !== null && after >= MINIMUM_SEPARATION_RATIO) {
      return new BandwrightError(
        'SINGULAR',
        `${subject} cannot be told from the calibration's lack of fit (${measured}): ${diagnosis}; with a second-order term for ${listNames(remedy.names)} its signal ratio would be ${formatNumber(after)}: give ${listNames(remedy.names)} a second-order term (secondOrder)`,
        { parameter: 'spectra' },
      );
    }
    return new BandwrightError(
      'SINGULAR',
      `${subject} is not distinguishable from the calibration residual (${measured}), not even after a second-order term for ${listNames(remedy.names)} removes the lack of fit (ratio ${after === null ? 'not available' : formatNumber(after)} then): ${absent}`,
      { parameter: 'spectra' },
    );
  }
  return new BandwrightError(
    'SINGULAR',
    `${subject} is not distinguishable from the calibration residual (${measured}), and that residual is lack of fit: ${diagnosis}; ${lackOfFitAdvice(lackOfFit)}; then see whether ${name} absorbs measurably in the method's ${channelWord}s`,
    { parameter: 'spectra' },
  );
}

/** The refusal of two components whose response spectra differ only by residual. */
function shapeRefusal(input: CheckInput, component: number, other: number, ratio: number): BandwrightError {
  const { components, channelWord, lackOfFit } = input;
  const pair = `${components[component]!.name} and ${components[other]!.name}`;
  const measured = `their difference carries ${formatNumber(ratio)} times the energy the calibration residual leaves in it, must be >= ${MINIMUM_SEPARATION_RATIO}`;
  const coincide = `their bands coincide and cannot be separated; extend the regions to where their bands differ, or drop one of them`;
  if (!lackOfFit.detected) {
    return new BandwrightError(
      'SINGULAR',
      `pure spectra of ${pair} have the same shape within the calibration noise (${measured}): ${coincide}`,
      { parameter: 'spectra' },
    );
  }
  const diagnosis = describeLackOfFit(lackOfFit, input.fitted.state);
  const remedy = withHelpfulSecondOrder(input);
  if (remedy !== null) {
    const after = remedy.ratios.pairs.find(
      (entry) => entry.component === component && entry.other === other,
    )?.ratio;
    if (after !== undefined && after >= MINIMUM_SEPARATION_RATIO) {
      return new BandwrightError(
        'SINGULAR',
        `pure spectra of ${pair} cannot be told apart through the calibration's lack of fit (${measured}): ${diagnosis}; with a second-order term for ${listNames(remedy.names)} their separation ratio would be ${formatNumber(after)}: give ${listNames(remedy.names)} a second-order term (secondOrder)`,
        { parameter: 'spectra' },
      );
    }
    return new BandwrightError(
      'SINGULAR',
      `pure spectra of ${pair} have the same shape within the calibration residual (${measured}), even after a second-order term for ${listNames(remedy.names)} removes the lack of fit (ratio ${after === undefined ? 'not available' : formatNumber(after)} then): ${coincide}`,
      { parameter: 'spectra' },
    );
  }
  return new BandwrightError(
    'SINGULAR',
    `pure spectra of ${pair} have the same shape within the calibration residual (${measured}), and that residual is lack of fit: ${diagnosis}; ${lackOfFitAdvice(lackOfFit)}; then see whether their bands differ over the method's ${channelWord}s`,
    { parameter: 'spectra' },
  );
}

/** The lack of fit in words: the residual against the blanks' noise, and the second-order terms that would reduce it. */
function describeLackOfFit(lackOfFit: ClsLackOfFit, state: ClsState): string {
  const sd = Math.sqrt(state.calibrationResidualSum / state.calibrationResidualCount);
  const parts: string[] = [];
  if (lackOfFit.residualOverBlank !== null && lackOfFit.blankVariance !== null) {
    parts.push(
      `the calibration residual (SD ${formatNumber(sd)} a channel) is ${formatNumber(Math.sqrt(lackOfFit.residualOverBlank))} times the noise of the ${lackOfFit.blanks} zero-gas standard(s) (SD ${formatNumber(Math.sqrt(lackOfFit.blankVariance))}), so it is mostly lack of fit rather than noise`,
    );
  } else {
    parts.push(
      `the calibration residual (SD ${formatNumber(sd)} a channel) is lack of fit rather than noise`,
    );
  }
  const helpful = helpfulGains(lackOfFit);
  if (helpful.length > 0) {
    parts.push(
      `a second-order term would remove ${listNames(helpful.map((gain) => `${Math.round(100 * gain.residualReduction)} % of it for ${gain.component}`))} (significant at 99 %)`,
    );
  }
  return parts.join('; ');
}

/** Second-order terms that would remove a significant and substantial part of the residual, largest first. */
function helpfulGains(lackOfFit: ClsLackOfFit): ClsSecondOrderGain[] {
  return lackOfFit.secondOrderGains
    .filter((gain) => gain.fStatistic > gain.fLimit && gain.residualReduction >= SUBSTANTIAL_REDUCTION)
    .sort((a, b) => b.residualReduction - a.residualReduction);
}

/** What to do about a lack of fit. */
function lackOfFitAdvice(lackOfFit: ClsLackOfFit): string {
  const helpful = helpfulGains(lackOfFit);
  if (helpful.length > 0)
    return `give ${listNames(helpful.map((gain) => gain.component))} a second-order term (secondOrder), or choose regions with weaker lines`;
  return 'no second-order term of a gas that lacks one removes it: look for curvature beyond second order (saturated lines: choose regions with weaker lines or a narrower calibrated range), lines of different gases that overlap (they multiply in transmittance), an absorber in the standards the method does not model, or a baseline the polynomial order does not follow';
}

/**
 * Diagnoses lack of fit (see the header): blanks' noise against the residual, and the residual a
 * second-order term would remove for each component that has none.
 */
function diagnoseLackOfFit(input: {
  projected: readonly Float64Array[];
  design: readonly Float64Array[];
  components: readonly ClsComponent[];
  terms: readonly ClsTerm[];
  fitted: FittedState;
  conditionLimit: number;
}): ClsLackOfFit {
  const { projected, design, components, terms, fitted } = input;
  const { state } = fitted;
  const n = projected.length;
  const q = terms.length;
  const p = components.length;
  const baseCount = state.calibrationResidualCount / (n - q);
  const squareSum = correlationSquareSum(fitted.correlation);
  const residualVariance =
    state.calibrationResidualCount > 0 ? state.calibrationResidualSum / state.calibrationResidualCount : 0;

  const blankRows = design
    .map((row, i) => (Array.from({ length: p }, (_, j) => row[j]!).every((value) => value === 0) ? i : -1))
    .filter((i) => i >= 0);
  let blankVariance: number | null = null;
  let residualOverBlank: number | null = null;
  let residualOverBlankLimit: number | null = null;
  if (blankRows.length > 0 && baseCount > 0) {
    let energy = 0;
    for (const i of blankRows) energy += dot(projected[i]!, projected[i]!);
    blankVariance = energy / (blankRows.length * baseCount);
    if (blankVariance > 0 && residualVariance > 0) {
      residualOverBlank = residualVariance / blankVariance;
      residualOverBlankLimit = fQuantile(
        TEST_PROBABILITY,
        state.calibrationDegreesOfFreedom,
        (blankRows.length * baseCount) / squareSum,
      );
    }
  }

  const secondOrderGains: ClsSecondOrderGain[] = [];
  if (n - q - 1 >= 1 && state.calibrationResidualSum > 0) {
    const responses = projected.map((row) => Array.from(row));
    for (let c = 0; c < p; c++) {
      if (terms.some((term) => term.component === c && term.power === 2)) continue;
      const levels = new Set(design.map((row) => row[c]!));
      if (levels.size < 3) continue;
      let reduced: number;
      try {
        const fit = solveLeastSquaresMany(
          design.map((row) => [...Array.from(row), row[c]! * row[c]!]),
          responses,
          { conditionLimit: input.conditionLimit },
        );
        reduced = fit.residualSumOfSquares.reduce((a, b) => a + b, 0);
      } catch (error) {
        if (isBandwrightError(error, 'SINGULAR') || isBandwrightError(error, 'INSUFFICIENT_DATA')) continue;
        throw error;
      }
      const removed = Math.max(state.calibrationResidualSum - reduced, 0);
      const fStatistic =
        reduced > 0 ? removed / baseCount / (reduced / ((n - q - 1) * baseCount)) : Number.POSITIVE_INFINITY;
      secondOrderGains.push({
        component: components[c]!.name,
        residualReduction: removed / state.calibrationResidualSum,
        fStatistic,
        fLimit: fQuantile(TEST_PROBABILITY, baseCount / squareSum, ((n - q - 1) * baseCount) / squareSum),
      });
    }
  }
  const aboveNoise =
    residualOverBlank !== null &&
    residualOverBlankLimit !== null &&
    residualOverBlank > Math.max(residualOverBlankLimit, DEFAULT_POOR_FIT_RATIO ** 2);
  const partial: ClsLackOfFit = {
    blanks: blankRows.length,
    blankVariance,
    residualOverBlank,
    residualOverBlankLimit,
    secondOrderGains,
    detected: false,
  };
  return { ...partial, detected: aboveNoise || helpfulGains(partial).length > 0 };
}

// ---------------------------------------------------------------------------------------------
// Prediction

/** Options of {@link predictClsState}. */
export interface ClsStatePredictOptions {
  /** Residual-RMS ratio (sample / calibration) that a poor fit must also exceed. */
  readonly poorFitRatio: number;
  /** Apply the stored inflation factors (false inside cross-validation). */
  readonly inflate: boolean;
}

/** Least-squares solution of a small system by Householder QR (ml-matrix); rows ≥ columns. */
function solveSmall(matrix: readonly (readonly number[])[], rhs: readonly (readonly number[])[]): number[][] {
  return toArrays(
    new QrDecomposition(new Matrix(matrix.map((row) => Array.from(row)))).solve(
      new Matrix(rhs.map((row) => Array.from(row))),
    ),
  );
}

/**
 * Predicts φ-scaled concentrations of one sample (responses on the model's channels, not
 * modified) with standard errors, residual and fit diagnostics.
 */
function predictRaw(
  state: ClsState,
  sample: ArrayLike<number>,
  options: ClsStatePredictOptions,
): RawPrediction {
  const { terms, pureSpectra, predictionMatrix, responseFactor } = state;
  const p = state.componentCount;
  const q = terms.length;
  const y = removeSpan(sample, state.nuisance);
  const channels = y.length;
  const thetaLinear = new Float64Array(q);
  for (let t = 0; t < q; t++) thetaLinear[t] = dot(predictionMatrix[t]!, y);

  let c = thetaLinear.slice(0, p);
  let covarianceFactor: readonly (readonly number[])[] = state.linearCovarianceFactor;
  let iterations = 0;
  const warnings: string[] = [];
  if (q > p) {
    // Gauss–Newton in the reduced space: minimise ‖z − R θ(c)‖ with z = R θ̂.
    const z = responseFactor.map((row) => row.reduce((sum, value, k) => sum + value * thetaLinear[k]!, 0));
    const objective = (candidate: ArrayLike<number>): number => {
      const theta = termValues(terms, candidate);
      let sum = 0;
      for (let i = 0; i < q; i++) {
        let model = 0;
        for (let k = i; k < q; k++) model += responseFactor[i]![k]! * theta[k]!;
        sum += (z[i]! - model) ** 2;
      }
      return sum;
    };
    const jacobian = (candidate: ArrayLike<number>): number[][] => {
      // J = R D, D = ∂θ/∂c (q × p)
      const derivative = terms.map((term) => {
        const row = new Array<number>(p).fill(0);
        row[term.component] = term.power === 1 ? 1 : 2 * candidate[term.component]!;
        return row;
      });
      return multiplyMatrices(responseFactor, derivative);
    };
    let current = objective(c);
    let converged = false;
    for (iterations = 1; iterations <= 50; iterations++) {
      const theta = termValues(terms, c);
      const residual = z.map((value, i) => {
        let model = 0;
        for (let k = i; k < q; k++) model += responseFactor[i]![k]! * theta[k]!;
        return [value - model];
      });
      const step = solveSmall(jacobian(c), residual).map((row) => row[0]!);
      let scale = 1;
      let accepted = false;
      for (let halving = 0; halving < 40; halving++) {
        const trial = c.map((value, j) => value + scale * step[j]!);
        const value = objective(trial);
        if (value <= current) {
          c = trial;
          current = value;
          accepted = true;
          break;
        }
        scale /= 2;
      }
      const stepSize = Math.sqrt(step.reduce((sum, value) => sum + value * value, 0)) * scale;
      const size = Math.sqrt(c.reduce((sum, value) => sum + value * value, 0));
      if (!accepted || stepSize <= 1e-12 * (size + 1e-300)) {
        converged = true;
        break;
      }
    }
    if (!converged) warnings.push('second-order solution: Gauss–Newton did not converge in 50 iterations');
    const pseudoInverse = solveSmall(jacobian(c), identity(q)); // p × q
    covarianceFactor = multiplyMatrices(
      multiplyMatrices(pseudoInverse, state.noiseGram),
      transpose(pseudoInverse),
    );
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
 * @param options - the sample's φ (> 0), confidence level, poor-fit ratio
 * @returns estimates of reported components and of interferents, residual and flags
 * @throws BandwrightError `INVALID_VALUE` for a wrong length, a non-finite value, φ ≤ 0 or a
 *   level outside (0, 1)
 */
export function predictClsState(
  model: ClsCoreModel,
  state: ClsState,
  sample: ArrayLike<number>,
  options: { phi: number; level: number; poorFitRatio: number; channelWord: string },
): ClsPrediction {
  if (sample.length !== model.channelCount) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `sample has ${sample.length} ${options.channelWord}s, the model was fitted on ${model.channelCount}, must be equal`,
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
  if (!(options.poorFitRatio >= 1)) {
    throw new BandwrightError('INVALID_VALUE', `poorFitRatio = ${options.poorFitRatio}, must be >= 1`, {
      parameter: 'poorFitRatio',
    });
  }
  const raw = predictRaw(state, sample, { poorFitRatio: options.poorFitRatio, inflate: true });
  const t = criticalT(options.level, raw.degreesOfFreedom);
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
    level: options.level,
    iterations: raw.iterations,
    warnings: raw.warnings,
  };
}

/**
 * Builds the numeric prediction state from a model (typed arrays, derived factors). Call once per
 * model and reuse for many samples.
 *
 * @param model - a fitted core model
 * @param nuisance - the orthonormal nuisance basis the model was fitted with (empty for bands)
 * @returns the state
 */
export function prepareClsState(model: ClsCoreModel, nuisance: readonly Float64Array[]): ClsState {
  const rInverse = invertUpperTriangular(model.responseFactor);
  return {
    componentCount: model.components.length,
    terms: model.terms,
    pureSpectra: model.pureSpectra.map((row) => Float64Array.from(row)),
    predictionMatrix: model.predictionMatrix.map((row) => Float64Array.from(row)),
    responseFactor: model.responseFactor,
    noiseGram: model.noiseGram,
    concentrationGramInverse: model.concentrationGramInverse,
    linearCovarianceFactor: multiplyMatrices(
      multiplyMatrices(rInverse, model.noiseGram),
      transpose(rInverse),
    ),
    nuisance,
    calibrationResidualSum: model.calibration.residualVariance * model.calibration.residualCount,
    calibrationResidualCount: model.calibration.residualCount,
    calibrationDegreesOfFreedom: model.calibration.degreesOfFreedom,
    sampleResidualCount: model.sampleResidualCount,
    sampleDegreesOfFreedom: model.sampleDegreesOfFreedom,
    inflation: model.crossValidation.inflation,
    responseScale: model.calibration.responseScale,
  };
}

// ---------------------------------------------------------------------------------------------
// The fit driver

/**
 * Fits the CLS core: validates nothing about shapes (the callers do, with their own words),
 * removes the nuisance, fits K, checks separability, estimates the channel-noise correlation,
 * runs leave-one-out cross-validation and returns the serialisable model.
 *
 * @param data - responses, certified concentrations, φ per standard, components (not modified)
 * @param options - level, condition limit, second-order components, nuisance basis, segments
 * @returns the core model
 * @throws BandwrightError `SINGULAR` naming the components that cannot be separated;
 *   `INSUFFICIENT_DATA` when there are too few standards or channels for the terms
 */
export function fitClsCore(data: ClsCoreData, options: ClsCoreOptions): ClsCoreModel {
  const { components } = data;
  const n = data.responses.length;
  const p = components.length;
  const channels = data.responses[0]!.length;
  const terms: ClsTerm[] = [
    ...components.map((_, j) => ({ component: j, power: 1 as const })),
    ...options.secondOrder.map((j) => ({ component: j, power: 2 as const })),
  ];
  const q = terms.length;
  if (n < q + 1) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `${n} standard(s) for ${q} model term(s) (${listNames(terms.map((term) => termName(components, term)))}): CLS needs at least ${q + 1} standards`,
      { parameter: 'spectra' },
    );
  }
  if (channels - options.nuisance.length - q < 1) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `${channels} ${options.channelWord}(s) for ${q} term(s) and ${options.nuisance.length} baseline/background term(s): needs more ${options.channelWord}s than terms`,
      { parameter: 'spectra' },
    );
  }
  const projected = data.responses.map((row) => removeSpan(row, options.nuisance));
  const scaled = data.concentrations.map((row, i) => {
    const phi = data.phi[i]!;
    return Float64Array.from({ length: p }, (_, j) => row[j]! * phi);
  });
  const design = scaled.map((u) => termValues(terms, u));

  let fitted: FittedState;
  try {
    fitted = fitState({
      projected,
      design,
      components,
      terms,
      nuisance: options.nuisance,
      segments: options.segments,
      correlation: options.estimateCorrelation ? 'estimate' : [1],
      conditionLimit: options.conditionLimit,
      channelWord: options.channelWord,
    });
  } catch (error) {
    throw rephraseDesignError(error);
  }
  const correlation = fitted.correlation;
  if (!(fitted.state.sampleResidualCount >= 1)) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `${channels} ${options.channelWord}s leave ${formatNumber(fitted.state.sampleResidualCount)} independent residual value(s) after the baseline and ${q} term(s), given the channel-noise correlation (${correlation.length - 1} lags): widen the regions`,
      { parameter: 'spectra' },
    );
  }
  const lackOfFit = diagnoseLackOfFit({
    projected,
    design,
    components,
    terms,
    fitted,
    conditionLimit: options.conditionLimit,
  });
  const checks = checkPureSpectra({
    fitted,
    projected,
    nuisance: options.nuisance,
    design,
    components,
    terms,
    segments: options.segments,
    conditionLimit: options.conditionLimit,
    channelWord: options.channelWord,
    localWeights: options.localResidualWeights,
    lackOfFit,
  });
  const state = fitted.state;

  // Leave-one-out cross-validation.
  const errors: number[][] = components.map(() => []);
  const standardized: number[][] = components.map(() => []);
  let predictions = 0;
  for (let left = 0; left < n; left++) {
    const keep = (_: unknown, i: number): boolean => i !== left;
    let reduced: FittedState;
    try {
      reduced = fitState({
        projected: projected.filter(keep),
        design: design.filter(keep),
        components,
        terms,
        nuisance: options.nuisance,
        segments: options.segments,
        correlation,
        conditionLimit: Number.POSITIVE_INFINITY,
        channelWord: options.channelWord,
      });
    } catch (error) {
      if (isBandwrightError(error, 'SINGULAR') || isBandwrightError(error, 'INSUFFICIENT_DATA')) continue;
      throw error;
    }
    const raw = predictRaw(reduced.state, data.responses[left]!, {
      poorFitRatio: DEFAULT_POOR_FIT_RATIO,
      inflate: false,
    });
    predictions++;
    const phi = data.phi[left]!;
    for (let j = 0; j < p; j++) {
      const error = raw.scaled[j]! - scaled[left]![j]!;
      errors[j]!.push(error / phi);
      const se = raw.standardErrors[j]!;
      if (se > 0 && Number.isFinite(se)) standardized[j]!.push(error / se);
    }
  }
  const meanSquare = (values: readonly number[]): number | null =>
    values.length > 0 ? values.reduce((sum, v) => sum + v * v, 0) / values.length : null;
  const rmsecv = errors.map((values) => {
    const ms = meanSquare(values);
    return ms === null ? null : Math.sqrt(ms);
  });
  const standardizedRms = standardized.map((values) => {
    const ms = meanSquare(values);
    return ms === null ? null : Math.sqrt(ms);
  });
  const calibrationDf = state.calibrationDegreesOfFreedom;
  const inflation = standardized.map((values) => {
    const ms = meanSquare(values);
    if (ms === null || !(calibrationDf > 0)) return 1;
    const limit = fQuantile(TEST_PROBABILITY, values.length, calibrationDf);
    return ms > limit ? Math.sqrt(ms) : 1;
  });
  const thresholdCount = Math.max(...standardized.map((values) => values.length));
  const threshold =
    thresholdCount > 0 && calibrationDf > 0
      ? fQuantile(TEST_PROBABILITY, thresholdCount, calibrationDf)
      : null;

  const ranges = components.map((_, j) => {
    let min = Infinity;
    let max = -Infinity;
    for (const u of scaled) {
      min = Math.min(min, u[j]!);
      max = Math.max(max, u[j]!);
    }
    return { min, max };
  });
  const calibrationVariance =
    state.calibrationResidualCount > 0 ? state.calibrationResidualSum / state.calibrationResidualCount : 0;
  return {
    components: components.map((component) => ({
      name: component.name,
      reported: component.reported,
      unit: component.unit,
    })),
    terms,
    channelCount: channels,
    pureSpectra: state.pureSpectra.map((row) => Array.from(row)),
    predictionMatrix: state.predictionMatrix.map((row) => Array.from(row)),
    responseFactor: fitted.rFactor.map((row) => row.slice()),
    noiseGram: state.noiseGram.map((row) => row.slice()),
    concentrationGramInverse: state.concentrationGramInverse.map((row) => row.slice()),
    noiseCorrelation: correlation,
    segments: options.segments.map((segment) => ({
      start: segment.start,
      end: segment.end,
      region: segment.region,
    })),
    sampleResidualCount: state.sampleResidualCount,
    sampleDegreesOfFreedom: state.sampleDegreesOfFreedom,
    ranges,
    calibration: {
      standards: n,
      residualVariance: calibrationVariance,
      residualRms: Math.sqrt(state.calibrationResidualSum / (n * channels)),
      residualCount: state.calibrationResidualCount,
      degreesOfFreedom: state.calibrationDegreesOfFreedom,
      conditionConcentrations: fitted.conditionConcentrations,
      conditionPureSpectra: checks.condition,
      signalRatio: checks.signalRatio,
      separationRatio: checks.separationRatio,
      lackOfFit,
      responseScale: state.responseScale,
    },
    crossValidation: { predictions, rmsecv, standardizedRms, inflation, threshold },
    level: options.level,
    warnings: lackOfFitWarnings(lackOfFit, state, components, inflation),
  };
}

/** The warning a calibration that passes its checks carries when its residual is lack of fit. */
function lackOfFitWarnings(
  lackOfFit: ClsLackOfFit,
  state: ClsState,
  components: readonly ClsComponent[],
  inflation: readonly number[],
): string[] {
  if (!lackOfFit.detected) return [];
  const widened = components
    .map((component, j) => ({ name: component.name, factor: inflation[j]! }))
    .filter((entry) => entry.factor > 1);
  const consequence =
    widened.length > 0
      ? `cross-validation widens the intervals (${widened.map((entry) => `${entry.name} ×${entry.factor.toFixed(2)}`).join(', ')}) to cover it`
      : 'cross-validation does not show it in the estimates, but results near the ends of the calibrated range may be biased';
  return [
    `lack of fit: ${describeLackOfFit(lackOfFit, state)}; ${consequence}; ${lackOfFitAdvice(lackOfFit)}`,
  ];
}

/** Puts the shared engine's collinearity message in the words of a calibration. */
function rephraseDesignError(error: unknown): unknown {
  if (isBandwrightError(error, 'SINGULAR')) {
    return new BandwrightError(
      'SINGULAR',
      `standards' concentrations cannot separate the gases: ${error.message.replace(/^design columns /, '').replace(/^design column /, '')} (in every standard they keep the same ratio, or one is a combination of the others)`,
      { parameter: 'concentrations' },
      { cause: error },
    );
  }
  return error;
}
