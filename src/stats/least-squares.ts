/**
 * Linear least squares by QR decomposition, ordinary and weighted, with conditioning checks.
 *
 * Method (never the normal equations, which square the condition number):
 * 1. Weighted least squares minimises Σ wᵢ (yᵢ − xᵢᵀβ)²; scaling row i of the design and yᵢ by
 *    √wᵢ turns it into an ordinary problem.
 * 2. Every column of the (row-scaled) design is divided by its Euclidean norm, so the QR and the
 *    condition number do not depend on the units of the columns (equilibration).
 * 3. The singular values of that column-scaled design (ml-matrix SVD) give the condition number
 *    and the rank. A rank-deficient design, or one whose condition number exceeds the limit, is
 *    refused; the right singular vector of the smallest singular value says which columns are
 *    involved (its large components are the columns of the near-linear combination).
 * 4. Householder QR (ml-matrix) of the scaled design solves for the scaled coefficients, which are
 *    then unscaled. (XᵀWX)⁻¹ = D⁻¹ R⁻¹ R⁻ᵀ D⁻¹ with D the column norms; Cov(β) = s² (XᵀWX)⁻¹.
 *
 * Residual SD s = √(RSS/df), RSS = Σ wᵢ rᵢ², df = n − p. R²: when the design has an intercept
 * (a column whose entries are all the same non-zero value) R² = 1 − RSS / Σ wᵢ (yᵢ − ȳ_w)², with
 * ȳ_w the weighted mean; without one, R² = 1 − RSS / Σ wᵢ yᵢ² (uncentred), the definition NIST
 * StRD certifies for its no-intercept datasets.
 */
import { AbstractMatrix, Matrix, QrDecomposition, SingularValueDecomposition } from 'ml-matrix';
import { BandwrightError } from '../errors.js';
import { dot, invertUpperTriangular, multiply, transpose } from './linear-algebra.js';
import { exponentText, listNames } from '../words.js';

/** A design matrix: rows are observations, columns are regressors. */
export type Design = readonly (readonly number[])[] | AbstractMatrix;

/**
 * Default largest condition number accepted for the column-scaled design. A relative error ε in
 * the data can grow to about ε·κ in the coefficients; at κ = 1e10 double precision (ε ≈ 2e-16)
 * still leaves about six significant digits, well above what any calibration reports.
 */
export const DEFAULT_CONDITION_LIMIT = 1e10;

/** Options of {@link leastSquares}. */
export interface LeastSquaresOptions {
  /** Weight of each observation, all finite and > 0 (default: all 1). */
  weights?: ArrayLike<number>;
  /** Name of each design column, used in messages (default `x1`, `x2`, …). */
  columnNames?: readonly string[];
  /** Largest condition number of the column-scaled design accepted (default {@link DEFAULT_CONDITION_LIMIT}). */
  conditionLimit?: number;
}

/** Result of {@link leastSquares}; plain arrays and numbers only. */
export interface LeastSquaresFit {
  /** Estimated coefficients, one per design column, in the units of y per unit of that column. */
  coefficients: number[];
  /** Standard errors of the coefficients (NaN when df = 0). */
  standardErrors: number[];
  /** Covariance matrix of the coefficients, s²(XᵀWX)⁻¹ (NaN entries when df = 0). */
  covariance: number[][];
  /** (XᵀWX)⁻¹, the covariance divided by s²; leverage and prediction variances use it. */
  unscaledCovariance: number[][];
  /** Residuals yᵢ − ŷᵢ, unweighted, in the units of y. */
  residuals: number[];
  /** Fitted values ŷᵢ = xᵢᵀβ. */
  fitted: number[];
  /** Residual standard deviation s = √(RSS/df) (NaN when df = 0); for weighted fits, in units of y·√w. */
  residualSD: number;
  /** Residual degrees of freedom, n − p. */
  degreesOfFreedom: number;
  /** Residual sum of squares, Σ wᵢ rᵢ². */
  rss: number;
  /** Coefficient of determination; see {@link LeastSquaresFit.rSquaredKind}. */
  rSquared: number;
  /** `centred` when the design has an intercept column, otherwise `uncentred` (1 − RSS/Σwy²). */
  rSquaredKind: 'centred' | 'uncentred';
  /** Index of the intercept column (all entries equal and non-zero), or −1 when there is none. */
  interceptColumn: number;
  /** Condition number of the row-weighted, column-scaled design (ratio of extreme singular values). */
  conditionNumber: number;
  /** Numerical rank of the design. */
  rank: number;
  /** Number of observations. */
  n: number;
  /** Column names as used in messages. */
  columnNames: string[];
}

/** Result of {@link solveLeastSquaresMany}. */
export interface LeastSquaresManyFit {
  /** Coefficients, p rows (one per design column) × k columns (one per response column). */
  coefficients: number[][];
  /** Residual sum of squares of each response column. */
  residualSumOfSquares: number[];
  /** (XᵀX)⁻¹ of the design, p × p, shared by every response column. */
  unscaledCovariance: number[][];
  /** Residual degrees of freedom, n − p. */
  degreesOfFreedom: number;
  /** Condition number of the column-scaled design. */
  conditionNumber: number;
  /** Numerical rank of the design. */
  rank: number;
}

interface PreparedDesign {
  rows: number;
  columns: number;
  /** Row-weighted design, row-major. */
  weighted: number[][];
  /** Column norms of the row-weighted design. */
  norms: number[];
  /** √w per row. */
  rootWeights: number[];
  names: string[];
  qr: QrDecomposition;
  /** R⁻¹ of the column-scaled design. */
  rInverse: number[][];
  conditionNumber: number;
  rank: number;
}

function toRows(design: Design): number[][] {
  if (AbstractMatrix.isMatrix(design)) return design.to2DArray();
  return design.map((row) => Array.from(row));
}

function prepare(design: Design, n: number, options: LeastSquaresOptions): PreparedDesign {
  const rows = toRows(design);
  if (rows.length !== n) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `design has ${rows.length} rows but there are ${n} observations, must be equal`,
      { parameter: 'design' },
    );
  }
  const columns = rows[0]?.length ?? 0;
  if (columns < 1)
    throw new BandwrightError('INVALID_VALUE', 'design has no columns, must have at least one', {
      parameter: 'design',
    });
  const names = Array.from({ length: columns }, (_, j) => options.columnNames?.[j] ?? `x${j + 1}`);
  if (options.columnNames !== undefined && options.columnNames.length !== columns) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `columnNames has ${options.columnNames.length} names for ${columns} design columns, must be equal`,
      { parameter: 'columnNames' },
    );
  }
  if (n < columns) {
    throw new BandwrightError(
      'INSUFFICIENT_DATA',
      `design has ${n} observations for ${columns} coefficients (${listNames(names)}): least squares needs at ` +
        `least as many observations as coefficients`,
      { parameter: 'design' },
    );
  }
  const rootWeights = new Array<number>(n).fill(1);
  if (options.weights !== undefined) {
    if (options.weights.length !== n) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `weights has ${options.weights.length} values for ${n} observations, must be equal`,
        { parameter: 'weights' },
      );
    }
    for (let i = 0; i < n; i++) {
      const w = options.weights[i] as number;
      if (!(Number.isFinite(w) && w > 0)) {
        throw new BandwrightError('INVALID_VALUE', `weights[${i}] = ${w}, must be a finite number > 0`, {
          parameter: 'weights',
        });
      }
      rootWeights[i] = Math.sqrt(w);
    }
  }
  const weighted: number[][] = [];
  const norms = new Array<number>(columns).fill(0);
  for (let i = 0; i < n; i++) {
    const row = rows[i] as number[];
    if (row.length !== columns) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `design row ${i} has ${row.length} entries, must have ${columns} like row 0`,
        { parameter: 'design' },
      );
    }
    const rw = rootWeights[i] as number;
    const out = new Array<number>(columns);
    for (let j = 0; j < columns; j++) {
      const value = row[j] as number;
      if (!Number.isFinite(value)) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `design row ${i}, column ${names[j] as string} = ${value}, must be a finite number`,
          { parameter: 'design' },
        );
      }
      out[j] = value * rw;
    }
    weighted.push(out);
  }
  for (let j = 0; j < columns; j++) {
    // Two-pass norm with scaling, so huge or tiny columns neither overflow nor underflow.
    let largest = 0;
    for (let i = 0; i < n; i++) largest = Math.max(largest, Math.abs((weighted[i] as number[])[j]!));
    if (largest === 0) {
      throw new BandwrightError(
        'SINGULAR',
        `design column ${names[j] as string} is all zero: its coefficient cannot be estimated`,
        { parameter: 'design' },
      );
    }
    let sum = 0;
    for (let i = 0; i < n; i++) sum += ((weighted[i] as number[])[j]! / largest) ** 2;
    norms[j] = largest * Math.sqrt(sum);
  }
  const scaled = new Matrix(n, columns);
  for (let i = 0; i < n; i++)
    for (let j = 0; j < columns; j++) scaled.set(i, j, (weighted[i] as number[])[j]! / norms[j]!);

  const svd = new SingularValueDecomposition(scaled, {
    computeLeftSingularVectors: false,
    autoTranspose: false,
  });
  const singular = svd.diagonal;
  let largest = 0;
  let smallest = Number.POSITIVE_INFINITY;
  let smallestIndex = 0;
  singular.forEach((value, index) => {
    if (value > largest) largest = value;
    if (value < smallest) {
      smallest = value;
      smallestIndex = index;
    }
  });
  const conditionNumber = smallest > 0 ? largest / smallest : Number.POSITIVE_INFINITY;
  const rank = svd.rank;
  const limit = options.conditionLimit ?? DEFAULT_CONDITION_LIMIT;
  if (!(limit >= 1))
    throw new BandwrightError('INVALID_VALUE', `conditionLimit = ${limit}, must be >= 1`, {
      parameter: 'conditionLimit',
    });
  if (columns > 1 && (rank < columns || !(conditionNumber <= limit))) {
    const v = svd.rightSingularVectors;
    const magnitudes = names.map((_, j) => Math.abs(v.get(j, smallestIndex)));
    const biggest = Math.max(...magnitudes);
    let involved = names.map((_, j) => j).filter((j) => magnitudes[j]! >= 0.25 * biggest);
    if (involved.length < 2) {
      involved = names
        .map((_, j) => j)
        .sort((a, b) => magnitudes[b]! - magnitudes[a]!)
        .slice(0, 2)
        .sort((a, b) => a - b);
    }
    const detail =
      rank < columns
        ? `rank ${rank} of ${columns}, condition number ${exponentText(conditionNumber)}`
        : `condition number ${exponentText(conditionNumber)} exceeds the limit ${exponentText(limit)}`;
    throw new BandwrightError(
      'SINGULAR',
      `design columns ${listNames(involved.map((j) => names[j] as string))} are collinear (${detail}): their ` +
        `effects cannot be separated; drop one of them or add observations that vary them independently`,
      { parameter: 'design' },
    );
  }
  const qr = new QrDecomposition(scaled);
  const rInverse = invertUpperTriangular(qr.upperTriangularMatrix.to2DArray());
  return { rows: n, columns, weighted, norms, rootWeights, names, qr, rInverse, conditionNumber, rank };
}

/** (XᵀX)⁻¹ = D⁻¹ R⁻¹ R⁻ᵀ D⁻¹ of the column-scaled design, D the column norms. */
function unscaledCovarianceOf(prepared: PreparedDesign): number[][] {
  const { rInverse, norms } = prepared;
  return multiply(rInverse, transpose(rInverse)).map((row, i) =>
    row.map((value, j) => value / (norms[i]! * norms[j]!)),
  );
}

function checkResponse(y: ArrayLike<number>, label: string): number[] {
  const out = Array.from(y);
  out.forEach((value, i) => {
    if (!Number.isFinite(value))
      throw new BandwrightError('INVALID_VALUE', `${label}[${i}] = ${value}, must be a finite number`, {
        parameter: label,
      });
  });
  return out;
}

/**
 * Fits y ≈ Xβ by (weighted) least squares through a QR decomposition of the column-scaled design.
 *
 * @param design - n × p design matrix (rows = observations), as nested arrays or an ml-matrix Matrix; not modified
 * @param y - n responses; not modified
 * @param options - weights, column names for messages, condition-number limit
 * @returns coefficients, standard errors, covariance, residuals and fit statistics (plain arrays)
 * @throws BandwrightError `INVALID_VALUE` for mismatched sizes, non-finite entries or weights ≤ 0;
 *   `INSUFFICIENT_DATA` when there are fewer observations than columns; `SINGULAR` when a column is
 *   all zero, the design is rank-deficient, or its condition number exceeds the limit — the
 *   message names the collinear columns
 * @example
 * const fit = leastSquares([[1, 0], [1, 1], [1, 2]], [1, 3, 5], { columnNames: ['intercept', 'x'] });
 * fit.coefficients; // [1, 2]
 */
export function leastSquares(
  design: Design,
  y: ArrayLike<number>,
  options: LeastSquaresOptions = {},
): LeastSquaresFit {
  const response = checkResponse(y, 'y');
  const n = response.length;
  const prepared = prepare(design, n, options);
  const { columns, norms, rootWeights } = prepared;
  const weightedResponse = Matrix.columnVector(response.map((value, i) => value * rootWeights[i]!));
  const scaledSolution = prepared.qr.solve(weightedResponse);
  const coefficients = Array.from({ length: columns }, (_, j) => scaledSolution.get(j, 0) / norms[j]!);

  const rows = toRows(design);
  const fitted = rows.map((row) => dot(row, coefficients));
  const residuals = response.map((value, i) => value - fitted[i]!);
  const weights = rootWeights.map((rw) => rw * rw);
  const rss = residuals.reduce((sum, r, i) => sum + weights[i]! * r * r, 0);
  const df = n - columns;
  const variance = df > 0 ? rss / df : Number.NaN;
  const unscaledCovariance = unscaledCovarianceOf(prepared);
  const covariance = unscaledCovariance.map((row) => row.map((value) => value * variance));
  const standardErrors = covariance.map((row, j) => Math.sqrt(row[j]!));

  const interceptColumn = findInterceptColumn(rows, columns);
  let total: number;
  if (interceptColumn >= 0) {
    const weightSum = weights.reduce((a, b) => a + b, 0);
    const mean = response.reduce((sum, value, i) => sum + weights[i]! * value, 0) / weightSum;
    total = response.reduce((sum, value, i) => sum + weights[i]! * (value - mean) ** 2, 0);
  } else {
    total = response.reduce((sum, value, i) => sum + weights[i]! * value * value, 0);
  }
  const rSquared = total > 0 ? 1 - rss / total : Number.NaN;

  return {
    coefficients,
    standardErrors,
    covariance,
    unscaledCovariance,
    residuals,
    fitted,
    residualSD: Math.sqrt(variance),
    degreesOfFreedom: df,
    rss,
    rSquared,
    rSquaredKind: interceptColumn >= 0 ? 'centred' : 'uncentred',
    interceptColumn,
    conditionNumber: prepared.conditionNumber,
    rank: prepared.rank,
    n,
    columnNames: prepared.names,
  };
}

function findInterceptColumn(rows: readonly (readonly number[])[], columns: number): number {
  for (let j = 0; j < columns; j++) {
    const first = rows[0]?.[j];
    if (first === undefined || first === 0) continue;
    if (rows.every((row) => row[j] === first)) return j;
  }
  return -1;
}

/**
 * Solves min ‖Y − X B‖ column by column for many response columns with one QR of X (for
 * classical least squares, A = C K: X = concentrations, Y = spectra, B = K).
 *
 * Unweighted. The design is column-scaled and checked for conditioning exactly as in
 * {@link leastSquares}.
 *
 * @param design - n × p design matrix (rows = observations); not modified
 * @param responses - n × k response matrix (rows = observations, columns = responses); not modified
 * @param options - column names for messages and the condition-number limit
 * @returns coefficients (p × k), residual sum of squares per response column, (XᵀX)⁻¹, degrees of
 *   freedom, condition number, rank
 * @throws BandwrightError as {@link leastSquares}; `INVALID_VALUE` for a ragged or non-finite response matrix
 * @example
 * const { coefficients } = solveLeastSquaresMany([[1], [2]], [[2, 3], [4, 6]]);
 * coefficients; // [[2, 3]]
 */
export function solveLeastSquaresMany(
  design: Design,
  responses: readonly (readonly number[])[] | AbstractMatrix,
  options: { columnNames?: readonly string[]; conditionLimit?: number } = {},
): LeastSquaresManyFit {
  const responseRows = AbstractMatrix.isMatrix(responses)
    ? responses.to2DArray()
    : responses.map((row) => Array.from(row));
  const n = responseRows.length;
  const k = responseRows[0]?.length ?? 0;
  if (k < 1)
    throw new BandwrightError('INVALID_VALUE', 'responses has no columns, must have at least one', {
      parameter: 'responses',
    });
  responseRows.forEach((row, i) => {
    if (row.length !== k)
      throw new BandwrightError(
        'INVALID_VALUE',
        `responses row ${i} has ${row.length} entries, must have ${k} like row 0`,
        { parameter: 'responses' },
      );
    row.forEach((value, j) => {
      if (!Number.isFinite(value))
        throw new BandwrightError(
          'INVALID_VALUE',
          `responses row ${i}, column ${j} = ${value}, must be a finite number`,
          { parameter: 'responses' },
        );
    });
  });
  const prepared = prepare(design, n, {
    ...(options.columnNames ? { columnNames: options.columnNames } : {}),
    ...(options.conditionLimit !== undefined ? { conditionLimit: options.conditionLimit } : {}),
  });
  const { columns, norms } = prepared;
  const solution = prepared.qr.solve(new Matrix(responseRows));
  const coefficients: number[][] = [];
  for (let j = 0; j < columns; j++) {
    const row = new Array<number>(k);
    for (let c = 0; c < k; c++) row[c] = solution.get(j, c) / norms[j]!;
    coefficients.push(row);
  }
  const rows = prepared.weighted; // weights are all 1 here, so this is the design itself
  const residualSumOfSquares = new Array<number>(k).fill(0);
  for (let i = 0; i < n; i++) {
    const designRow = rows[i] as number[];
    const responseRow = responseRows[i] as number[];
    for (let c = 0; c < k; c++) {
      let fitted = 0;
      for (let j = 0; j < columns; j++) fitted += designRow[j]! * (coefficients[j] as number[])[c]!;
      const r = responseRow[c]! - fitted;
      residualSumOfSquares[c]! += r * r;
    }
  }
  return {
    coefficients,
    residualSumOfSquares,
    unscaledCovariance: unscaledCovarianceOf(prepared),
    degreesOfFreedom: n - columns,
    conditionNumber: prepared.conditionNumber,
    rank: prepared.rank,
  };
}
