/**
 * Mandel's fitting test (ISO 8466-1, DIN 38402-51): does a second-order calibration fit
 * significantly better than a straight line on the same standards?
 *
 * DS² = (n − 2)·s²_lin − (n − 3)·s²_quad (the reduction in residual sum of squares bought by the
 * quadratic term), test value PW = DS² / s²_quad, compared with F(0.99; 1, n − 3) by default. PW
 * above the critical value means the curvature is real: use a second-order calibration.
 */
import { BandwrightError } from '../errors.js';
import { fCdf, fQuantile } from './distributions.js';
import { significantDigits } from '../words.js';

/** Inputs of {@link mandelTest}: the residual variances of both fits to the same n standards. */
export interface MandelInput {
  /** Number of standards (observations) both fits used; ≥ 4. */
  n: number;
  /** Residual variance s²_lin of the straight line y = a + b·x (n − 2 degrees of freedom), response units². */
  linearResidualVariance: number;
  /**
   * Residual variance s²_quad of the second-order fit y = a + b·x + c·x² (n − 3 degrees of
   * freedom), response units².
   */
  quadraticResidualVariance: number;
}

/** Outcome of {@link mandelTest}; plain JSON-safe numbers and strings. */
export interface MandelResult {
  /**
   * DS² = (n−2)s²_lin − (n−3)s²_quad, response units². Rounding can make it slightly negative; it
   * is then taken as 0.
   */
  ds2: number;
  /**
   * PW = DS²/s²_quad. An infinite PW (s²_quad = 0 with DS² > 0, which only noise-free data give)
   * is stored as Number.MAX_VALUE so the result stays JSON-safe.
   */
  testValue: number;
  /** F(confidence; 1, n − 3). */
  fCritical: number;
  /** Confidence level of the critical value (default 0.99). */
  confidence: number;
  /** Degrees of freedom of the F distribution, [1, n − 3]. */
  degreesOfFreedom: [number, number];
  /** P(F(1, n−3) ≥ PW): small means the second-order term is real. */
  pValue: number;
  /** True when PW > F critical: the second-order curve fits significantly better. */
  significant: boolean;
  /** The verdict in plain words, with the numbers. */
  recommendation: string;
  /** Name of the test and its standards. */
  definition: string;
}

/**
 * Mandel's fitting test from the residual variances of a straight-line and a second-order fit.
 *
 * @param input - n and both residual variances (response units²)
 * @param options - `confidence` of the F critical value, default 0.99 as ISO 8466-1 prescribes
 * @returns DS², PW, the critical value, p-value, verdict and a recommendation in plain words
 * @throws BandwrightError `INSUFFICIENT_DATA` when n < 4 (the second-order fit needs a residual
 *   degree of freedom); `INVALID_VALUE` for negative or non-finite variances or a confidence outside (0, 1)
 * @example
 * mandelTest({ n: 10, linearResidualVariance: 36977, quadraticResidualVariance: 41855 }).significant; // false
 */
export function mandelTest(input: MandelInput, options: { confidence?: number } = {}): MandelResult {
  const confidence = options.confidence ?? 0.99;
  const { n, linearResidualVariance: linear, quadraticResidualVariance: quadratic } = input;
  if (!(confidence > 0 && confidence < 1)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `confidence = ${confidence}, must be strictly between 0 and 1`,
      { parameter: 'confidence' },
    );
  }
  if (!Number.isInteger(n) || n < 4) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `Mandel test: n = ${n} standards, needs at least 4 (the second-order fit must keep one residual degree ` +
        `of freedom)`,
      { parameter: 'n' },
    );
  }
  for (const [name, value] of [
    ['linearResidualVariance', linear],
    ['quadraticResidualVariance', quadratic],
  ] as const) {
    if (!(Number.isFinite(value) && value >= 0)) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `Mandel test: ${name} = ${value}, must be a finite number >= 0`,
        { parameter: name },
      );
    }
  }
  const ds2 = Math.max(0, (n - 2) * linear - (n - 3) * quadratic);
  const fCritical = fQuantile(confidence, 1, n - 3);
  let testValue: number;
  if (quadratic > 0) testValue = ds2 / quadratic;
  else testValue = ds2 > 0 ? Number.POSITIVE_INFINITY : 0;
  const pValue = Number.isFinite(testValue) ? 1 - fCdf(testValue, 1, n - 3) : 0;
  const significant = testValue > fCritical;
  const numbers =
    `PW = ${significantDigits(testValue)} ${significant ? '>' : '≤'} F(${confidence}; 1, ${n - 3}) = ` +
    `${significantDigits(fCritical)}`;
  const recommendation = significant
    ? `the second-order curve fits significantly better (${numbers}): use a second-order calibration`
    : `the second-order curve does not fit significantly better (${numbers}): a straight line is adequate`;
  return {
    ds2,
    testValue: Number.isFinite(testValue) ? testValue : Number.MAX_VALUE,
    fCritical,
    confidence,
    degreesOfFreedom: [1, n - 3],
    pValue,
    significant,
    recommendation,
    definition:
      'Mandel fitting test (ISO 8466-1, DIN 38402-51): DS² = (n−2)s²_lin − (n−3)s²_quad, PW = DS²/s²_quad ' +
      'against F(1, n−3)',
  };
}
