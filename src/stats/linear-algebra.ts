/**
 * Small dense linear algebra on plain arrays, the one home of matrix arithmetic for the models.
 *
 * The models keep their matrices as nested number arrays (a fitted model is plain JSON) and most
 * of them are a few rows square (terms × terms, the three coefficients of a curve), where building
 * ml-matrix objects costs more than the arithmetic. Products, transposes and quadratic forms are
 * therefore written here once; decompositions (QR, SVD) come from ml-matrix, as in
 * `least-squares.ts`. Sums run in index order from zero, so results do not depend on which caller
 * asks.
 */
import { Matrix, QrDecomposition } from 'ml-matrix';

/** A dense matrix as rows of numbers (not modified by any function here). */
export type DenseMatrix = readonly (readonly number[])[];

/**
 * The identity matrix.
 *
 * @param size - number of rows and columns
 * @returns a new size × size matrix
 */
export function identity(size: number): number[][] {
  return Array.from({ length: size }, (_, i) => Array.from({ length: size }, (_, j) => (i === j ? 1 : 0)));
}

/**
 * The transpose of a matrix.
 *
 * @param a - rows × columns
 * @returns a new columns × rows matrix
 */
export function transpose(a: DenseMatrix): number[][] {
  const rows = a.length;
  const columns = a[0]?.length ?? 0;
  return Array.from({ length: columns }, (_, j) => Array.from({ length: rows }, (_, i) => a[i]![j]!));
}

/**
 * The product A·B. Zero entries of A are skipped, so triangular and sparse factors cost less (and
 * a zero times an infinite entry of B contributes nothing rather than NaN).
 *
 * @param a - rows × inner
 * @param b - inner × columns
 * @returns a new rows × columns matrix
 */
export function multiply(a: DenseMatrix, b: DenseMatrix): number[][] {
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

/**
 * The inverse of an upper-triangular matrix by back-substitution.
 *
 * @param r - square upper-triangular matrix with non-zero diagonal (entries below it are ignored)
 * @returns a new upper-triangular matrix R⁻¹ (a zero diagonal entry gives infinite entries)
 */
export function invertUpperTriangular(r: DenseMatrix): number[][] {
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

/**
 * The dot product Σ aᵢ bᵢ.
 *
 * @param a - a vector
 * @param b - a vector at least as long as `a`
 */
export function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < a.length; i++) sum += a[i]! * b[i]!;
  return sum;
}

/**
 * The quadratic form vᵀ M v = Σᵢ Σⱼ vᵢ Mᵢⱼ vⱼ.
 *
 * @param matrix - square matrix, at least v.length rows and columns
 * @param v - the vector
 */
export function quadraticForm(matrix: DenseMatrix, v: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < v.length; i++) for (let j = 0; j < v.length; j++) sum += v[i]! * matrix[i]![j]! * v[j]!;
  return sum;
}

/**
 * The bilinear form aᵀ M b = Σᵢ Σₖ aᵢ Mᵢₖ bₖ, skipping zero entries of `a` (combinations that pick
 * a few rows of M).
 *
 * @param a - left vector
 * @param matrix - a.length × b.length matrix
 * @param b - right vector
 */
export function bilinearForm(a: ArrayLike<number>, matrix: DenseMatrix, b: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < a.length; i++)
    if (a[i] !== 0) for (let k = 0; k < b.length; k++) sum += a[i]! * matrix[i]![k]! * b[k]!;
  return sum;
}

/**
 * Least-squares solution X of min ‖A X − B‖ by Householder QR (ml-matrix), for small systems
 * with at least as many rows as columns; with A square and non-singular it is A⁻¹ B.
 *
 * @param a - rows × columns, rows ≥ columns, full column rank
 * @param b - rows × k right-hand sides
 * @returns a new columns × k matrix
 * @throws Error from ml-matrix when A is rank-deficient
 */
export function solveByQr(a: DenseMatrix, b: DenseMatrix): number[][] {
  const qr = new QrDecomposition(new Matrix(a.map((row) => Array.from(row))));
  return qr.solve(new Matrix(b.map((row) => Array.from(row)))).to2DArray();
}
