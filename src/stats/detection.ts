/**
 * Decision, detection and determination limits from a calibration (DIN 32645, ISO 11843-2,
 * calibration method), and the simple ICH Q2 estimates.
 *
 * Straight line y = a + b·x from n standards, residual SD s_y, s_x0 = s_y/b (method SD),
 * Sxx = Σ(xᵢ − x̄)², f = n − 2, m replicate measurements of the sample:
 * - decision limit   x_C = s_x0 · t(1−α, f) · √(1/m + 1/n + x̄²/Sxx)
 * - detection limit  x_D = s_x0 · (t(1−α, f) + t(1−β, f)) · √(1/m + 1/n + x̄²/Sxx); with α = β this
 *   is exactly 2·x_C, the form usually quoted as "x_D ≈ 2 x_C". (ISO 11843-2 refines the factor
 *   t(1−α) + t(1−β) into δ(f; α; β) from the non-central t distribution; that refinement is not
 *   applied here.)
 * - determination limit x_Q = k · s_x0 · t(1−α/2, f) · √(1/m + 1/n + (x_Q − x̄)²/Sxx), solved by
 *   fixed-point iteration from x_Q = k·x_C (relative uncertainty 1/k at x_Q; k = 3 by default)
 * - ICH Q2: LOD = 3.3·σ/b, LOQ = 10·σ/b with σ the residual SD of the calibration.
 *
 * {@link curveLimits} generalises the same definitions to any calibration curve through the
 * variance of the fitted blank response and the local slope (delta method); for the straight line
 * it reproduces the DIN formulas.
 */
import { BandwrightError } from '../errors.js';
import { tQuantile } from './distributions.js';

/** One limit, in concentration units, with the definition that produced it. */
export interface LimitValue {
  /** The limit in concentration units, or null when it cannot be computed (the definition says why). */
  value: number | null;
  /** Method, formula and parameters, in words. */
  definition: string;
}

/** Decision, detection and determination limits of a calibration; JSON-safe. */
export interface CalibrationLimits {
  /** Decision limit x_C (critical value): a result above it is distinguishable from the blank at risk α. */
  decision: LimitValue;
  /** Detection limit x_D: a true concentration at x_D is detected with probability 1 − β. */
  detection: LimitValue;
  /** Determination (quantitation) limit x_Q: relative uncertainty 1/k at x_Q. */
  determination: LimitValue;
  /** ICH Q2 detection limit 3.3·σ/b. */
  ichDetection: LimitValue;
  /** ICH Q2 quantitation limit 10·σ/b. */
  ichQuantitation: LimitValue;
  /** Error probability of the first kind (false positive). */
  alpha: number;
  /** Error probability of the second kind (false negative). */
  beta: number;
  /** Determination-limit factor (1/relative uncertainty). */
  k: number;
  /** Replicate measurements m of each sample the limits assume. */
  replicates: number;
  /** Degrees of freedom of the t quantiles. */
  degreesOfFreedom: number;
}

/** Straight-line limits add the method SD of DIN 32645. */
export interface StraightLineLimits extends CalibrationLimits {
  /** Method SD s_x0 = s_y/|b|, concentration units. */
  methodSD: number;
  /** Relative method SD V_x0 = s_x0/x̄ (fraction, not percent). */
  relativeMethodSD: number;
}

/** Options shared by the limit functions. */
export interface LimitOptions {
  /** Risk of a false positive, 0 < α < 0.5 (default 0.05). */
  alpha?: number;
  /** Risk of a false negative (default α). */
  beta?: number;
  /** Determination-limit factor k, > 0 (default 3). */
  k?: number;
  /** Replicate measurements m per sample, integer ≥ 1 (default 1). */
  replicates?: number;
}

interface ResolvedOptions {
  alpha: number;
  beta: number;
  k: number;
  replicates: number;
}

function resolve(options: LimitOptions): ResolvedOptions {
  const alpha = options.alpha ?? 0.05;
  const beta = options.beta ?? alpha;
  const k = options.k ?? 3;
  const replicates = options.replicates ?? 1;
  for (const [name, value] of [
    ['alpha', alpha],
    ['beta', beta],
  ] as const) {
    if (!(value > 0 && value < 0.5))
      throw new BandwrightError('INVALID_VALUE', `${name} = ${value}, must be between 0 and 0.5`, {
        parameter: name,
      });
  }
  if (!(Number.isFinite(k) && k > 0))
    throw new BandwrightError('INVALID_VALUE', `k = ${k}, must be a finite number > 0`, { parameter: 'k' });
  if (!(Number.isInteger(replicates) && replicates >= 1)) {
    throw new BandwrightError('INVALID_VALUE', `replicates = ${replicates}, must be an integer >= 1`, {
      parameter: 'replicates',
    });
  }
  return { alpha, beta, k, replicates };
}

/** Fixed-point iteration x ← g(x); null when it does not settle within the iteration budget. */
function fixedPoint(g: (x: number) => number, start: number): number | null {
  let x = start;
  for (let iteration = 0; iteration < 200; iteration++) {
    const next = g(x);
    if (!Number.isFinite(next)) return null;
    if (Math.abs(next - x) <= 1e-13 * Math.max(Math.abs(next), Number.MIN_VALUE)) return next;
    x = next;
  }
  return null;
}

/** Inputs of {@link straightLineLimits}: the straight-line calibration's statistics. */
export interface StraightLineInput {
  /** Number of calibration measurements n (≥ 3). */
  n: number;
  /** Slope b, response units per concentration unit (non-zero). */
  slope: number;
  /** Residual SD s_y of the calibration, response units (> 0). */
  residualSD: number;
  /** Mean concentration x̄ of the standards. */
  meanX: number;
  /** Sxx = Σ(xᵢ − x̄)², concentration units² (> 0). */
  sxx: number;
}

/**
 * DIN 32645 calibration-method limits and ICH Q2 limits for an unweighted straight line.
 *
 * @param input - n, slope b, residual SD s_y, mean concentration x̄, Sxx (concentration units as the calibration)
 * @param options - α (default 0.05), β (default α), k (default 3), replicates m (default 1)
 * @returns x_C, x_D, x_Q, ICH LOD/LOQ, each with its definition; s_x0 and V_x0
 * @throws BandwrightError `INVALID_VALUE` for n < 3, zero slope, non-positive s_y or Sxx, or options out of range
 * @example
 * // DIN 32645 worked example: x_C = 0.0698 at α = 0.01
 * straightLineLimits(
 *   { n: 10, slope: 9661.939, residualSD: 192.294, meanX: 0.275, sxx: 0.20625 },
 *   { alpha: 0.01 },
 * ).decision.value;
 */
export function straightLineLimits(input: StraightLineInput, options: LimitOptions = {}): StraightLineLimits {
  const { alpha, beta, k, replicates } = resolve(options);
  const { n, slope, residualSD, meanX, sxx } = input;
  if (!(Number.isInteger(n) && n >= 3))
    throw new BandwrightError('INVALID_VALUE', `n = ${n}, must be an integer >= 3 for a straight line`, {
      parameter: 'n',
    });
  if (!(Number.isFinite(slope) && slope !== 0))
    throw new BandwrightError('INVALID_VALUE', `slope = ${slope}, must be a finite non-zero number`, {
      parameter: 'slope',
    });
  if (!(Number.isFinite(residualSD) && residualSD > 0))
    throw new BandwrightError('INVALID_VALUE', `residualSD = ${residualSD}, must be a finite number > 0`, {
      parameter: 'residualSD',
    });
  if (!(Number.isFinite(sxx) && sxx > 0))
    throw new BandwrightError('INVALID_VALUE', `sxx = ${sxx}, must be a finite number > 0`, {
      parameter: 'sxx',
    });
  if (!Number.isFinite(meanX))
    throw new BandwrightError('INVALID_VALUE', `meanX = ${meanX}, must be a finite number`, {
      parameter: 'meanX',
    });
  const df = n - 2;
  const methodSD = residualSD / Math.abs(slope);
  const tAlpha = tQuantile(1 - alpha, df);
  const tBeta = tQuantile(1 - beta, df);
  const tTwoSided = tQuantile(1 - alpha / 2, df);
  const blankFactor = Math.sqrt(1 / replicates + 1 / n + (meanX * meanX) / sxx);
  const decision = methodSD * tAlpha * blankFactor;
  const detection = methodSD * (tAlpha + tBeta) * blankFactor;
  const determination = fixedPoint(
    (x) => k * methodSD * tTwoSided * Math.sqrt(1 / replicates + 1 / n + (x - meanX) ** 2 / sxx),
    k * decision,
  );
  const common = `α = ${alpha}, f = n − 2 = ${df}, m = ${replicates}`;
  return {
    decision: {
      value: decision,
      definition:
        `decision limit, DIN 32645 / ISO 11843-2 calibration method: x_C = s_x0·t(1−α, f)·√(1/m + ` +
        `1/n + x̄²/Sxx), ${common}`,
    },
    detection: {
      value: detection,
      definition:
        `detection limit, DIN 32645 calibration method: x_D = s_x0·(t(1−α, f) + t(1−β, f))·√(1/m + ` +
        `1/n + x̄²/Sxx), ${common}, β = ${beta}${alpha === beta ? ' (α = β, so x_D = 2·x_C exactly)' : ''}`,
    },
    determination: {
      value: determination,
      definition:
        determination === null
          ? `determination limit, DIN 32645: the iteration for x_Q did not converge (k = ${k}, ${common})`
          : `determination limit, DIN 32645 calibration method: x_Q = k·s_x0·t(1−α/2, f)·√(1/m + 1/n + (x_Q − ` +
            `x̄)²/Sxx), solved iteratively, k = ${k}, ${common}`,
    },
    ichDetection: {
      value: (3.3 * residualSD) / Math.abs(slope),
      definition: 'detection limit, ICH Q2: 3.3·σ/b with σ the residual SD of the calibration',
    },
    ichQuantitation: {
      value: (10 * residualSD) / Math.abs(slope),
      definition: 'quantitation limit, ICH Q2: 10·σ/b with σ the residual SD of the calibration',
    },
    alpha,
    beta,
    k,
    replicates,
    degreesOfFreedom: df,
    methodSD,
    relativeMethodSD: methodSD / meanX,
  };
}

/**
 * What {@link curveLimits} needs to know about a fitted calibration curve. Concentrations in the
 * calibration's unit, responses in its response unit.
 */
export interface CurveForLimits {
  /** Residual degrees of freedom of the fit. */
  degreesOfFreedom: number;
  /**
   * Residual SD s of the fit (for weighted fits, in weighted units: the variance of a new
   * observation at x is s²/w(x)).
   */
  residualSD: number;
  /** Local slope dŷ/dx at concentration x. */
  slopeAt: (x: number) => number;
  /** Variance of the fitted response ŷ(x) from the coefficient covariance, response units². */
  fittedVarianceAt: (x: number) => number;
  /** Weight w(x) of a new observation at x (1 for unweighted fits). */
  weightAt: (x: number) => number;
  /**
   * The curve and any approximation, in words, appended to every definition (e.g. "second-order
   * curve, linearised at zero concentration").
   */
  description: string;
}

/**
 * The DIN 32645 definitions generalised to any calibration curve by the delta method.
 *
 * With V(x) = s²/(m·w(x)) + Var(ŷ(x)) the variance of a sample's mean response about the curve:
 * x_C = t(1−α, df)·√V(0)/|ŷ′(0)|, x_D = (t(1−α, df) + t(1−β, df))·√V(0)/|ŷ′(0)|,
 * x_Q = k·t(1−α/2, df)·√V(x_Q)/|ŷ′(x_Q)| (iterated), ICH 3.3·σ₀/|ŷ′(0)| and 10·σ₀/|ŷ′(0)| with
 * σ₀ = s/√w(0). For an unweighted straight line these are the DIN formulas exactly; for a curve
 * they linearise it at zero concentration (x_C, x_D) or at x_Q.
 *
 * @param curve - the fit's degrees of freedom, residual SD, slope, fitted variance and weight functions
 * @param options - α (default 0.05), β (default α), k (default 3), replicates m (default 1)
 * @returns the limits with definitions; a limit is null (and says why) when the slope at zero is 0
 *   or the iteration does not converge
 * @throws BandwrightError `INVALID_VALUE` for degrees of freedom < 1, non-positive residual SD, or options out of range
 */
export function curveLimits(curve: CurveForLimits, options: LimitOptions = {}): CalibrationLimits {
  const { alpha, beta, k, replicates } = resolve(options);
  const { degreesOfFreedom: df, residualSD } = curve;
  if (!(Number.isFinite(df) && df >= 1))
    throw new BandwrightError('INVALID_VALUE', `degreesOfFreedom = ${df}, must be >= 1`, {
      parameter: 'degreesOfFreedom',
    });
  if (!(Number.isFinite(residualSD) && residualSD > 0))
    throw new BandwrightError('INVALID_VALUE', `residualSD = ${residualSD}, must be a finite number > 0`, {
      parameter: 'residualSD',
    });
  const tAlpha = tQuantile(1 - alpha, df);
  const tBeta = tQuantile(1 - beta, df);
  const tTwoSided = tQuantile(1 - alpha / 2, df);
  const variance = (x: number): number =>
    (residualSD * residualSD) / (replicates * curve.weightAt(x)) + curve.fittedVarianceAt(x);
  const slopeAtZero = Math.abs(curve.slopeAt(0));
  const common = `α = ${alpha}, df = ${df}, m = ${replicates}; ${curve.description}`;
  const noSlope =
    slopeAtZero > 0 && Number.isFinite(slopeAtZero)
      ? null
      : `the curve's slope at zero concentration is ${curve.slopeAt(0)}, so no limit can be derived from it`;
  const blank = Math.sqrt(variance(0));
  const decision = noSlope === null ? (tAlpha * blank) / slopeAtZero : null;
  const detection = noSlope === null ? ((tAlpha + tBeta) * blank) / slopeAtZero : null;
  const determination =
    decision === null
      ? null
      : fixedPoint(
          (x) => (k * tTwoSided * Math.sqrt(variance(x))) / Math.abs(curve.slopeAt(x)),
          k * decision,
        );
  const sigmaBlank = residualSD / Math.sqrt(curve.weightAt(0));
  const why = (text: string): string => (noSlope === null ? text : `${text}: not computed, ${noSlope}`);
  return {
    decision: {
      value: decision,
      definition: why(
        `decision limit, DIN 32645 calibration method by the delta method: x_C = t(1−α, df)·√(s²/(m·w(0)) + ` +
          `Var ŷ(0))/|ŷ′(0)|, ${common}`,
      ),
    },
    detection: {
      value: detection,
      definition: why(
        `detection limit, DIN 32645 calibration method by the delta method: x_D = (t(1−α, df) + t(1−β, ` +
          `df))·√(s²/(m·w(0)) + Var ŷ(0))/|ŷ′(0)|, β = ` +
          `${beta}${alpha === beta ? ' (α = β, so x_D = 2·x_C)' : ''}, ${common}`,
      ),
    },
    determination: {
      value: determination,
      definition:
        determination === null && noSlope === null
          ? `determination limit: the iteration for x_Q did not converge (k = ${k}, ${common})`
          : why(
              `determination limit, DIN 32645 calibration method by the delta method: x_Q = k·t(1−α/2, ` +
                `df)·√(s²/(m·w(x_Q)) + Var ŷ(x_Q))/|ŷ′(x_Q)|, solved iteratively, k = ${k}, ${common}`,
            ),
    },
    ichDetection: {
      value: noSlope === null ? (3.3 * sigmaBlank) / slopeAtZero : null,
      definition: why(
        `detection limit, ICH Q2: 3.3·σ/|ŷ′(0)| with σ = s/√w(0) the residual SD at zero concentration; ` +
          `${curve.description}`,
      ),
    },
    ichQuantitation: {
      value: noSlope === null ? (10 * sigmaBlank) / slopeAtZero : null,
      definition: why(
        `quantitation limit, ICH Q2: 10·σ/|ŷ′(0)| with σ = s/√w(0) the residual SD at zero concentration; ` +
          `${curve.description}`,
      ),
    },
    alpha,
    beta,
    k,
    replicates,
    degreesOfFreedom: df,
  };
}
