/**
 * Univariate calibration: response y (band area, peak height) against concentration x of
 * certified standards, and inverse prediction of a sample's concentration with its interval.
 *
 * Forms (DESIGN §3): straight line y = a + b·x, through the origin y = b·x, second order
 * y = a + b·x + c·x². Fitted by QR ({@link leastSquares}) on x centred at the (weighted) mean and
 * scaled by the largest distance from it, then converted to original units with the covariance
 * carried through the same linear map (Cov_orig = T·Cov·Tᵀ), so coefficients keep their digits
 * even when x reaches 1e6 (NIST Pontius).
 *
 * Weighting (variance of a response ∝ 1/w):
 * - `none`: w = 1.
 * - `1/x`, `1/x2`: w = 1/max(x, floor) or 1/max(x, floor)². The floor stands in for x at and
 *   below it, so standards at zero concentration (blanks) get a finite weight. It defaults to the
 *   lowest non-zero concentration among the standards (a blank is then weighted like the lowest
 *   standard) and is recorded in the model.
 * - `replicates`: w = 1/sᵢ² with sᵢ the SD of the replicate responses at each level; every level
 *   needs at least 2 replicates and some scatter. Between levels s(x) is interpolated linearly in
 *   x and held constant beyond the lowest and highest level.
 * Weights are normalised so that Σw = n; the residual SD s is then on the scale of a typical
 * response, and the variance of one new observation at x is s²/w(x).
 *
 * Inverse prediction of x0 from the mean ȳ0 of m responses (t at 1 − (1 − level)/2):
 * - straight line: x̂0 = (ȳ0 − a)/b, s_x0 = (s/|b|)·√(1/(m·w0) + 1/Σw + (ȳ0 − ȳ)²/(b²·Sxx)), df = n − 2
 * - through origin: x̂0 = ȳ0/b, s_x0 = (s/|b|)·√(1/(m·w0) + x̂0²/Σw·x²), df = n − 1
 * - second order: the root of a + b·x + c·x² = ȳ0 on the branch of the curve that holds the
 *   calibrated range; var(x̂0) = (s²/(m·w0) + gᵀ·Cov·g)/(b + 2c·x̂0)², g = (1, x̂0, x̂0²), df = n − 3
 * where w0 is the weight at x̂0 (for weighted fits the new observations are assumed to scatter as
 * the standards would at that concentration; unweighted w0 = 1), ȳ and Sxx = Σw(x − x̄)² are
 * weighted. Fieller's interval (straight line and through origin) is the set of x with
 * (ȳ0 − ŷ(x))² ≤ t²·(s²/(m·w(x)) + Var ŷ(x)): in closed form when unweighted, where g =
 * t²s²/(b²Sxx) ≥ 1 (slope not significantly different from zero at that level) makes it
 * unbounded; found numerically when weighted, with w(x) taken at each candidate x, so its coverage
 * does not rest on the plug-in w(x̂0) of the standard interval.
 */
import { BandwrightError } from '../errors.js';
import { criticalT } from '../stats/distributions.js';
import { leastSquares, type LeastSquaresFit } from '../stats/least-squares.js';
import { mandelTest, type MandelResult } from '../stats/mandel.js';
import {
  curveLimits,
  straightLineLimits,
  type CalibrationLimits,
  type LimitValue,
} from '../stats/detection.js';

/** Shape of the calibration curve. */
export type CurveForm = 'linear' | 'origin' | 'quadratic';
/** How standards are weighted; see the module comment for the rules. */
export type WeightScheme = 'none' | '1/x' | '1/x2' | 'replicates';

/** All curve forms, for validating options. */
export const CURVE_FORMS: readonly CurveForm[] = ['linear', 'origin', 'quadratic'];
/** All weighting schemes, for validating options. */
export const WEIGHT_SCHEMES: readonly WeightScheme[] = ['none', '1/x', '1/x2', 'replicates'];

/** Standards: certified concentrations and their measured responses, pairwise. */
export interface UnivariateData {
  /** Certified concentration of each standard (calibration unit, e.g. ppm), ≥ 0. Replicates repeat a value. */
  concentration: readonly number[];
  /** Response of each standard (band area in cm⁻¹·absorbance, or peak height in absorbance), reference conditions. */
  response: readonly number[];
}

/** Options of {@link fitUnivariate}. */
export interface UnivariateOptions {
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
  df: number;
  /** Number of standards. */
  n: number;
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

/** Options of {@link predictConcentration}. */
export interface PredictOptions {
  /** Two-sided confidence level of the interval, 0 < level < 1 (default 0.95). */
  level?: number;
  /** `standard` (default): the DESIGN §3 formulas; `fieller`: Fieller's exact interval (straight lines only). */
  method?: 'standard' | 'fieller';
}

/** A concentration inferred from responses, with its interval. JSON-safe. */
export interface ConcentrationEstimate {
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
  df: number;
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

function short(value: number): string {
  return String(Number(value.toPrecision(4)));
}

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
        `${name}[${i}] = ${String(value)}, must be within ±${MAX_MAGNITUDE} (sums of squares must stay finite in double precision)`,
        { parameter: `${name}[${i}]` },
      );
    }
    return value;
  });
}

/**
 * Largest magnitude of a concentration or response accepted by {@link fitUnivariate}: squares and
 * sums of squares of n values stay far inside the double range (about 1.8e308).
 */
export const MAX_MAGNITUDE = 1e100;

/** Linear interpolation of level SDs, held constant beyond the ends. */
function interpolateSD(levels: readonly ReplicateLevel[], x: number): number {
  const first = levels[0] as ReplicateLevel;
  const last = levels[levels.length - 1] as ReplicateLevel;
  if (x <= first.concentration) return first.sd;
  if (x >= last.concentration) return last.sd;
  for (let i = 1; i < levels.length; i++) {
    const right = levels[i] as ReplicateLevel;
    if (x <= right.concentration) {
      const left = levels[i - 1] as ReplicateLevel;
      const fraction = (x - left.concentration) / (right.concentration - left.concentration);
      return left.sd + fraction * (right.sd - left.sd);
    }
  }
  return last.sd;
}

function rawWeight(weighting: Omit<Weighting, 'scale' | 'rule'>, x: number): number {
  switch (weighting.scheme) {
    case 'none':
      return 1;
    case '1/x':
      return 1 / Math.max(x, weighting.floor as number);
    case '1/x2':
      return 1 / Math.max(x, weighting.floor as number) ** 2;
    case 'replicates':
      return 1 / interpolateSD(weighting.levels as ReplicateLevel[], x) ** 2;
  }
}

/**
 * Weight w(x) of a new observation at concentration x under the model's weighting (1 when unweighted).
 *
 * @param model - a fitted model
 * @param concentration - concentration, calibration units
 * @returns the weight, on the same normalised scale as the standards' weights
 */
export function weightAt(model: Pick<UnivariateModel, 'weighting'>, concentration: number): number {
  return model.weighting.scale * rawWeight(model.weighting, concentration);
}

function groupLevels(
  concentration: readonly number[],
  response: readonly number[],
): { level: number; responses: number[] }[] {
  const byLevel = new Map<number, number[]>();
  concentration.forEach((x, i) => {
    const list = byLevel.get(x) ?? [];
    list.push(response[i] as number);
    byLevel.set(x, list);
  });
  return [...byLevel.entries()]
    .sort((p, q) => p[0] - q[0])
    .map(([level, responses]) => ({ level, responses }));
}

function sampleSD(values: readonly number[]): number {
  const mean = values.reduce((a, b) => a + b, 0) / values.length;
  const sum = values.reduce((a, b) => a + (b - mean) ** 2, 0);
  return Math.sqrt(sum / (values.length - 1));
}

/** Polynomial design in u = (x − centre)/scale, degree 1 or 2, with intercept. */
function polynomialDesign(x: readonly number[], degree: 1 | 2, centre: number, scale: number): number[][] {
  return x.map((value) => {
    const u = (value - centre) / scale;
    return degree === 1 ? [1, u] : [1, u, u * u];
  });
}

/**
 * Map from coefficients α of Σ αⱼ·uʲ, u = (x − centre)/scale, to (a, b, c) of a + b·x + c·x²:
 * (x − centre)ʲ/scaleʲ expanded binomially. Returns a 3 × (degree + 1) matrix.
 */
function toOriginalUnits(degree: 1 | 2, centre: number, scale: number): number[][] {
  const binomial = [[1], [1, 1], [1, 2, 1]];
  const t: number[][] = [0, 1, 2].map(() => new Array<number>(degree + 1).fill(0));
  for (let j = 0; j <= degree; j++) {
    for (let i = 0; i <= j; i++) {
      (t[i] as number[])[j] = (((binomial[j] as number[])[i] as number) * (-centre) ** (j - i)) / scale ** j;
    }
  }
  return t;
}

function multiply(a: readonly (readonly number[])[], b: readonly (readonly number[])[]): number[][] {
  return a.map((row) =>
    (b[0] as readonly number[]).map((_, j) =>
      row.reduce((sum, value, k) => sum + value * ((b[k] as readonly number[])[j] as number), 0),
    ),
  );
}

function transpose(a: readonly (readonly number[])[]): number[][] {
  return (a[0] as readonly number[]).map((_, j) => a.map((row) => row[j] as number));
}

interface FormFit {
  fit: LeastSquaresFit;
  coefficients: Coefficients;
  covariance: number[][];
}

function fitForm(
  form: CurveForm,
  x: readonly number[],
  y: readonly number[],
  weights: readonly number[],
  centre: number,
  scale: number,
): FormFit {
  if (form === 'origin') {
    const fit = leastSquares(
      x.map((value) => [value]),
      y,
      { weights, columnNames: ['concentration'] },
    );
    const b = fit.coefficients[0] as number;
    const variance = (fit.covariance[0] as number[])[0] as number;
    return {
      fit,
      coefficients: { a: 0, b, c: 0 },
      covariance: [
        [0, 0, 0],
        [0, variance, 0],
        [0, 0, 0],
      ],
    };
  }
  const degree = form === 'linear' ? 1 : 2;
  const names =
    degree === 1 ? ['intercept', 'concentration'] : ['intercept', 'concentration', 'concentration²'];
  const fit = leastSquares(polynomialDesign(x, degree, centre, scale), y, { weights, columnNames: names });
  const t = toOriginalUnits(degree, centre, scale);
  const original = t.map((row) =>
    row.reduce((sum, value, j) => sum + value * (fit.coefficients[j] as number), 0),
  );
  const covariance = multiply(multiply(t, fit.covariance), transpose(t));
  return {
    fit,
    coefficients: { a: original[0] as number, b: original[1] as number, c: original[2] as number },
    covariance,
  };
}

function unavailableLimits(reason: string, alpha: number, df: number): CalibrationLimits {
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
    df,
  };
}

function quadraticForm(covariance: readonly (readonly number[])[], x: number): number {
  const g = [1, x, x * x];
  let sum = 0;
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++)
      sum += (g[i] as number) * ((covariance[i] as readonly number[])[j] as number) * (g[j] as number);
  return Math.max(0, sum);
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
 * const model = fitUnivariate({ concentration: [0, 50, 100, 150], response: [0.02, 4.1, 8.05, 12.2] }, { form: 'linear' });
 * predictConcentration(model, [6.1]).value; // ≈ 75
 */
export function fitUnivariate(data: UnivariateData, options: UnivariateOptions): UnivariateModel {
  const x = checkSeries(data?.concentration, 'concentration');
  const y = checkSeries(data?.response, 'response');
  if (x.length !== y.length) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `concentration has ${x.length} values and response has ${y.length}, must be equal (one response per standard)`,
      { parameter: 'response' },
    );
  }
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
  const p = parameters.length;
  const groups = groupLevels(x, y);
  const levels = groups.map((group) => group.level);
  if (n === 0)
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `no standards: a ${FORM_NAMES[form]} calibration needs at least ${p + 1} distinct concentration levels`,
      { parameter: 'concentration' },
    );
  if (levels.length === 1) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `all ${n} standards are at one concentration (${levels[0] as number}): a calibration needs standards at different concentrations (at least ${p + 1} levels for a ${FORM_NAMES[form]} fit)`,
      { parameter: 'concentration' },
    );
  }
  if (levels.length < p + 1) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `a ${FORM_NAMES[form]} calibration needs at least ${p + 1} distinct concentration levels (${p} parameters + 1), found ${levels.length} (${levels.join(', ')})`,
      { parameter: 'concentration' },
    );
  }
  if (y.every((value) => value === y[0])) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `every response is ${y[0] as number}: the response does not change with concentration, so no calibration can be made`,
      { parameter: 'response' },
    );
  }

  const warnings: string[] = [];
  let floor: number | null = null;
  let replicateLevels: ReplicateLevel[] | null = null;
  let rule = 'unweighted (w = 1)';
  if (scheme === '1/x' || scheme === '1/x2') {
    if (options.weightFloor !== undefined) {
      if (!(Number.isFinite(options.weightFloor) && options.weightFloor > 0)) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `weightFloor = ${options.weightFloor}, must be a finite concentration > 0 (it stands in for x in 1/x weights at and below it)`,
          { parameter: 'weightFloor' },
        );
      }
      floor = options.weightFloor;
    } else {
      floor = levels.find((level) => level > 0) as number;
    }
    const power = scheme === '1/x' ? 'max(x, floor)' : 'max(x, floor)²';
    rule = `w = 1/${power} with floor ${floor}${options.weightFloor === undefined ? ' (the lowest non-zero concentration)' : ''}, normalised so Σw = n`;
    const blanks = x.filter((value) => value < (floor as number)).length;
    if (blanks > 0) {
      warnings.push(
        `weights ${scheme}: ${blanks} standard${blanks === 1 ? '' : 's'} below the floor ${floor} (e.g. zero-concentration blanks) weighted as if at ${floor}${options.weightFloor === undefined ? '; set weightFloor to choose another floor' : ''}`,
      );
    }
  } else if (scheme === 'replicates') {
    replicateLevels = groups.map((group) => {
      if (group.responses.length < 2) {
        throw new BandwrightError(
          'INSUFFICIENT_DATA',
          `weights replicates: concentration ${group.level} has ${group.responses.length} standard, needs at least 2 replicates at every level to estimate its SD`,
          { parameter: 'weights' },
        );
      }
      const sd = sampleSD(group.responses);
      if (!(sd > 0)) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `weights replicates: the ${group.responses.length} replicates at concentration ${group.level} have identical responses (SD 0), so 1/s² is undefined`,
          { parameter: 'weights' },
        );
      }
      return { concentration: group.level, count: group.responses.length, sd };
    });
    rule =
      'w = 1/s(x)² with s the replicate SD at each level, linearly interpolated between levels and constant beyond them, normalised so Σw = n';
  }
  const provisional = { scheme, floor, levels: replicateLevels };
  const raw = x.map((value) => rawWeight(provisional, value));
  const rawSum = raw.reduce((a, b) => a + b, 0);
  const scale = n / rawSum;
  const weighting: Weighting = { scheme, floor, scale, levels: replicateLevels, rule };
  const weights = raw.map((w) => w * scale);

  const sumWeights = weights.reduce((a, b) => a + b, 0);
  const meanX = x.reduce((sum, value, i) => sum + (weights[i] as number) * value, 0) / sumWeights;
  const meanResponse = y.reduce((sum, value, i) => sum + (weights[i] as number) * value, 0) / sumWeights;
  const sxx = x.reduce((sum, value, i) => sum + (weights[i] as number) * (value - meanX) ** 2, 0);
  const sumXSquared = x.reduce((sum, value, i) => sum + (weights[i] as number) * value * value, 0);
  const spread = Math.max(...x.map((value) => Math.abs(value - meanX)));

  const main = fitForm(form, x, y, weights, meanX, spread);
  const { fit, coefficients, covariance } = main;
  const standardErrors: Coefficients = {
    a: Math.sqrt(Math.max(0, (covariance[0] as number[])[0] as number)),
    b: Math.sqrt(Math.max(0, (covariance[1] as number[])[1] as number)),
    c: Math.sqrt(Math.max(0, (covariance[2] as number[])[2] as number)),
  };

  let mandel: MandelResult | null = null;
  if (n >= 4 && levels.length >= 3) {
    try {
      const linear = form === 'linear' ? fit : fitForm('linear', x, y, weights, meanX, spread).fit;
      const quadratic = form === 'quadratic' ? fit : fitForm('quadratic', x, y, weights, meanX, spread).fit;
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
      `Mandel test not run: it needs at least 4 standards at 3 or more concentration levels (found ${n} at ${levels.length})`,
    );
  }
  if (mandel !== null) {
    if (mandel.significant && form !== 'quadratic') warnings.push(`Mandel test: ${mandel.recommendation}`);
    if (!mandel.significant && form === 'quadratic') warnings.push(`Mandel test: ${mandel.recommendation}`);
  }

  if (form === 'origin') {
    const straight = fitForm('linear', x, y, weights, meanX, spread);
    const interceptSE = Math.sqrt(Math.max(0, (straight.covariance[0] as number[])[0] as number));
    const tIntercept = criticalT(0.95, straight.fit.df);
    if (Math.abs(straight.coefficients.a) > tIntercept * interceptSE) {
      warnings.push(
        `a straight line with intercept gives a = ${short(straight.coefficients.a)} ± ${short(interceptSE)} (standard error), significantly different from 0 at 95 %: a through-origin calibration is biased on these standards`,
      );
    }
  }

  const df = fit.df;
  const tSlope = criticalT(0.95, df);
  if (Math.abs(coefficients.b) < tSlope * standardErrors.b && form !== 'quadratic') {
    warnings.push(
      `the slope b = ${short(coefficients.b)} is not significantly different from zero (standard error ${short(standardErrors.b)}, 95 %): concentrations inferred from this calibration are unreliable`,
    );
  }
  const range: [number, number] = [levels[0] as number, levels[levels.length - 1] as number];
  if (form === 'quadratic' && coefficients.c !== 0) {
    const vertex = -coefficients.b / (2 * coefficients.c);
    if (vertex > range[0] && vertex < range[1]) {
      warnings.push(
        `the second-order curve turns at concentration ${short(vertex)}, inside the calibrated range ${range[0]}–${range[1]}: responses near the turn do not determine one concentration`,
      );
    }
  }

  const model: UnivariateModel = {
    kind: 'univariate',
    form,
    weights: scheme,
    weighting,
    parameters: [...parameters],
    coefficients,
    standardErrors,
    covariance,
    residualSD: fit.residualSD,
    df,
    n,
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
    limits: unavailableLimits('pending', alpha, df),
    alpha,
    warnings,
  };
  model.limits = limitsFor(model);
  return model;
}

function limitsFor(model: UnivariateModel): CalibrationLimits {
  const { form, coefficients, covariance, residualSD, df, alpha } = model;
  const slopeAtZero = coefficients.b;
  if (!(residualSD > 0))
    return unavailableLimits(
      'the residual SD is 0 (the curve passes through every standard), so the noise cannot be estimated',
      alpha,
      df,
    );
  if (slopeAtZero === 0) return unavailableLimits('the slope at zero concentration is 0', alpha, df);
  if (form === 'linear' && model.weights === 'none') {
    return straightLineLimits(
      { n: model.n, slope: coefficients.b, residualSD, meanX: model.meanX, sxx: model.sxx },
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
      `weighted (${model.weighting.rule}): a new observation at x has variance s²/w(x), at zero concentration w(0) = w(${model.weighting.floor ?? 0})`,
    );
  return curveLimits(
    {
      df,
      residualSD,
      slopeAt: (x) => coefficients.b + 2 * coefficients.c * x,
      fittedVarianceAt: (x) => quadraticForm(covariance, x),
      weightAt: (x) => weightAt(model, x),
      description: parts.join('; '),
    },
    { alpha },
  );
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

/** Roots of A·z² + B·z + C = 0 by the cancellation-free formula; empty when complex. */
function quadraticRoots(A: number, B: number, C: number): number[] {
  if (A === 0) return B === 0 ? [] : [-C / B];
  const discriminant = B * B - 4 * A * C;
  if (discriminant < 0) return [];
  const q = -0.5 * (B + (B >= 0 ? 1 : -1) * Math.sqrt(discriminant));
  const roots = [q / A];
  if (q !== 0) roots.push(C / q);
  return roots.sort((p, r) => p - r);
}

function invertQuadratic(model: UnivariateModel, target: number): number {
  const { a, b, c } = model.coefficients;
  const [low, high] = model.range;
  if (c === 0) return (target - a) / b;
  const vertex = -b / (2 * c);
  const roots = quadraticRoots(c, b, a - target);
  if (roots.length === 0) {
    const vertexResponse = a + b * vertex + c * vertex * vertex;
    throw new BandwrightError(
      'NO_SOLUTION',
      `response ${short(target)} is beyond the vertex of the second-order calibration (its ${c < 0 ? 'highest' : 'lowest'} response is ${short(vertexResponse)}, at concentration ${short(vertex)}): no concentration gives this response`,
      { parameter: 'responses' },
    );
  }
  const tolerance = 1e-9 * (high - low);
  const inside = roots.filter((root) => root >= low - tolerance && root <= high + tolerance);
  let root: number;
  if (inside.length === 1) root = inside[0] as number;
  else if (inside.length === 2) {
    throw new BandwrightError(
      'NO_SOLUTION',
      `response ${short(target)} is reached twice inside the calibrated range (at concentrations ${short(inside[0] as number)} and ${short(inside[1] as number)}), because the second-order curve turns at ${short(vertex)}: the calibration is not monotonic there`,
      { parameter: 'responses' },
    );
  } else {
    // Outside the range: stay on the branch of the curve that holds the calibrated range.
    const side = Math.sign((low + high) / 2 - vertex);
    const onBranch = roots.filter((candidate) => Math.sign(candidate - vertex) === side || side === 0);
    const pool = onBranch.length > 0 ? onBranch : roots;
    root = pool.reduce((best, candidate) =>
      Math.min(Math.abs(candidate - low), Math.abs(candidate - high)) <
      Math.min(Math.abs(best - low), Math.abs(best - high))
        ? candidate
        : best,
    );
  }
  // One Newton step removes the last rounding of the closed form.
  const slope = b + 2 * c * root;
  if (slope !== 0) root -= (a + b * root + c * root * root - target) / slope;
  return root;
}

/**
 * Ends of {x : (ȳ0 − ŷ(x))² ≤ t²·(s²/(m·w(x)) + Var ŷ(x))} around x̂0, found by stepping outwards
 * until the inequality fails and then bisecting. An end that is not found within 1e8 times the
 * calibrated range is unbounded (null).
 */
function fiellerByBracketing(
  model: UnivariateModel,
  mean: number,
  m: number,
  t: number,
  start: number,
  se: number,
): { low: number | null; high: number | null } {
  const { a, b, c } = model.coefficients;
  const s2 = model.residualSD * model.residualSD;
  const excess = (x: number): number => {
    const residual = mean - (a + b * x + c * x * x);
    return residual * residual - t * t * (s2 / (m * weightAt(model, x)) + quadraticForm(model.covariance, x));
  };
  const width = Math.max(model.range[1] - model.range[0], Math.abs(start));
  const end = (direction: 1 | -1): number | null => {
    let inside = start;
    let step = Math.max(t * se, width * 1e-6);
    let outside: number | null = null;
    while (step <= 1e8 * width) {
      const candidate = start + direction * step;
      if (excess(candidate) >= 0) {
        outside = candidate;
        break;
      }
      inside = candidate;
      step *= 2;
    }
    if (outside === null) return null;
    let beyond: number = outside;
    for (let iteration = 0; iteration < 200 && Math.abs(beyond - inside) > 1e-14 * width; iteration++) {
      const middle: number = (inside + beyond) / 2;
      if (excess(middle) >= 0) beyond = middle;
      else inside = middle;
    }
    return (inside + beyond) / 2;
  };
  return { low: end(-1), high: end(1) };
}

/**
 * Infers the concentration of a sample from the mean of its m replicate responses, with an
 * interval at the given level (see the module comment for the formulas).
 *
 * @param model - a model from {@link fitUnivariate}
 * @param responses - the sample's responses at reference conditions (same quantity as the calibration's response); not modified
 * @param options - interval level (default 0.95) and method (`standard` or `fieller`)
 * @returns value, standard error, interval (null ends when a Fieller interval is unbounded), df, and flags
 * @throws BandwrightError `INVALID_VALUE` for empty or non-finite responses, a level outside (0, 1),
 *   or `fieller` with a second-order model; `NO_SOLUTION` when a second-order curve cannot give the
 *   response (beyond its vertex) or gives it twice inside the calibrated range, or when the
 *   estimate or its standard error is not finite (overflow far outside the calibration)
 * @example
 * const estimate = predictConcentration(model, [6.02, 6.11], { level: 0.95 });
 * [estimate.low, estimate.value, estimate.high];
 */
export function predictConcentration(
  model: UnivariateModel,
  responses: readonly number[],
  options: PredictOptions = {},
): ConcentrationEstimate {
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
  const { mean, m } = checkResponses(responses);
  const { a, b } = model.coefficients;
  const s = model.residualSD;
  const df = model.df;
  const t = criticalT(level, df);
  const warnings: string[] = [];
  let value: number;
  let variance: number;
  let g: number | null = null;
  let description: string;
  let newObservationTerm: number;

  if (model.form === 'quadratic') {
    value = invertQuadratic(model, mean);
    const w0 = weightAt(model, value);
    const slope = b + 2 * model.coefficients.c * value;
    newObservationTerm = (s * s) / (m * w0);
    variance = (newObservationTerm + quadraticForm(model.covariance, value)) / (slope * slope);
    description = `second-order inverse prediction: root of a + b·x + c·x² = ȳ0 on the calibrated branch, delta-method interval x̂0 ± t(${1 - (1 - level) / 2}, ${df})·s_x0 with var = (s²/(m·w0) + gᵀCov g)/(b + 2c·x̂0)²`;
  } else if (model.form === 'linear') {
    value = (mean - a) / b;
    const w0 = weightAt(model, value);
    newObservationTerm = 1 / (m * w0);
    variance =
      ((s * s) / (b * b)) *
      (newObservationTerm + 1 / model.sumWeights + (mean - model.meanResponse) ** 2 / (b * b * model.sxx));
    g = (t * t * s * s) / (b * b * model.sxx);
    description = `straight-line inverse prediction: x̂0 = (ȳ0 − a)/b ± t(${1 - (1 - level) / 2}, ${df})·s_x0, s_x0 = (s/|b|)·√(1/(m·w0) + 1/n + (ȳ0 − ȳ)²/(b²·Sxx))`;
  } else {
    value = mean / b;
    const w0 = weightAt(model, value);
    newObservationTerm = 1 / (m * w0);
    variance = ((s * s) / (b * b)) * (newObservationTerm + (value * value) / model.sumXSquared);
    g = (t * t * s * s) / (b * b * model.sumXSquared);
    description = `through-origin inverse prediction: x̂0 = ȳ0/b ± t(${1 - (1 - level) / 2}, ${df})·s_x0, s_x0 = (s/|b|)·√(1/(m·w0) + x̂0²/Σx²)`;
  }
  if (model.weights !== 'none')
    description += `; w0 = w(x̂0) = ${short(weightAt(model, value))} from the calibration's weighting`;
  const se = Math.sqrt(variance);
  // A response far outside the calibration (or a damaged model) can overflow the arithmetic; a
  // NaN or infinite estimate must never leave here looking like a result.
  if (!Number.isFinite(value) || !Number.isFinite(se)) {
    throw new BandwrightError(
      'NO_SOLUTION',
      `response ${short(mean)} gives concentration ${short(value)} with standard error ${short(se)}: not a finite estimate; the response is too far outside the calibrated responses (${short(model.meanResponse)} on average) or the model is damaged`,
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
      description = `Fieller interval: the concentrations x with (ȳ0 − ŷ(x))² ≤ t²·Var(ȳ0 − ŷ(x)), t = t(${1 - (1 - level) / 2}, ${df}), solved in closed form; g = t²s²/(b²·S) = ${short(gValue)}`;
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
      description = `Fieller interval: the concentrations x with (ȳ0 − ŷ(x))² ≤ t²·(s²/(m·w(x)) + Var ŷ(x)), t = t(${1 - (1 - level) / 2}, ${df}), with the weight w(x) taken at each x (${model.weighting.rule}), solved numerically; g = t²s²/(b²·S) = ${short(gValue)}`;
    }
    if (unbounded) {
      description += '; the slope is too poorly determined at this level, so the interval is unbounded';
      warnings.push(
        `the Fieller interval is unbounded (g = ${short(gValue)}): the calibration's slope is too poorly determined to bound this concentration at level ${level}`,
      );
    }
  } else if (g !== null && g > 0.1) {
    warnings.push(
      `the slope is poorly determined (g = ${short(g)} > 0.1): the standard interval is only approximate; use the Fieller method`,
    );
  }
  const [rangeLow, rangeHigh] = model.range;
  const tolerance = 1e-9 * (rangeHigh - rangeLow);
  const extrapolated = value < rangeLow - tolerance || value > rangeHigh + tolerance;
  if (extrapolated)
    warnings.push(
      `concentration ${short(value)} is outside the calibrated range ${rangeLow}–${rangeHigh} (extrapolated)`,
    );
  return {
    value,
    se,
    low,
    high,
    level,
    df,
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

/** Fitted response at a concentration with its confidence and prediction bands. */
export interface ResponseBandPoint {
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
export function responseBand(
  model: UnivariateModel,
  concentrations: readonly number[],
  options: { level?: number } = {},
): ResponseBandPoint[] {
  const level = options.level ?? 0.95;
  const t = criticalT(level, model.df);
  const { a, b, c } = model.coefficients;
  return concentrations.map((x, i) => {
    if (!Number.isFinite(x))
      throw new BandwrightError('INVALID_VALUE', `concentrations[${i}] = ${x}, must be a finite number`, {
        parameter: `concentrations[${i}]`,
      });
    const response = a + b * x + c * x * x;
    const fittedVariance = quadraticForm(model.covariance, x);
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
