/**
 * One curve form fitted by QR ({@link leastSquares}) on x centred at the (weighted) mean and
 * scaled by the largest distance from it, then converted to original units with the covariance
 * carried through the same linear map (Cov_orig = T·Cov·Tᵀ), so coefficients keep their digits
 * even when x reaches 1e6 (NIST Pontius). The through-origin form has no intercept to centre
 * around and is fitted on x itself.
 */
import { dot, multiply, transpose } from '../../stats/linear-algebra.js';
import { leastSquares, type LeastSquaresFit } from '../../stats/least-squares.js';
import type { Coefficients, CurveForm } from './model.js';

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

/** A curve form fitted to the standards, in original units. */
export interface CurveFit {
  /** The least-squares fit in centred and scaled units (residuals, R², condition number, df). */
  fit: LeastSquaresFit;
  /** Coefficients a, b, c in original units. */
  coefficients: Coefficients;
  /** 3 × 3 covariance of (a, b, c); rows and columns of fixed terms are 0. */
  covariance: number[][];
}

/**
 * Fits one curve form.
 *
 * @param form - curve form
 * @param x - concentrations (calibration units)
 * @param y - responses
 * @param weights - normalised weights of the standards
 * @param centre - centring concentration (the weighted mean)
 * @param scale - scaling concentration (the largest distance from the centre), > 0
 * @returns the fit with coefficients and covariance in original units
 * @throws BandwrightError `SINGULAR` from {@link leastSquares} when the design is too ill-conditioned
 */
export function fitCurve(
  form: CurveForm,
  x: readonly number[],
  y: readonly number[],
  weights: readonly number[],
  centre: number,
  scale: number,
): CurveFit {
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
  const original = t.map((row) => dot(row, fit.coefficients));
  const covariance = multiply(multiply(t, fit.covariance), transpose(t));
  return {
    fit,
    coefficients: { a: original[0] as number, b: original[1] as number, c: original[2] as number },
    covariance,
  };
}
