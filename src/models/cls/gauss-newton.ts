/**
 * The concentrations of a model with second-order terms. ĉ minimises ‖y − Kᵀθ(c)‖ by Gauss–Newton
 * from the linear estimate θ̂'s first p entries, entirely in the q-dimensional space of Kᵀ's
 * columns: with z = Q_Kᵀ y = R_K θ̂, ‖y − Kᵀθ(c)‖² = ‖y‖² − ‖z‖² + ‖z − R_K θ(c)‖², so each
 * iteration is a q × p problem (step halving keeps every step downhill). The covariance factor of
 * ĉ is J⁺ R J⁺ᵀ = G W Gᵀ with G = (R_K D)⁺, D = ∂θ/∂c at ĉ.
 */
import { dot, identity, multiply, solveByQr, transpose } from '../../stats/linear-algebra.js';
import type { ClsState } from './prediction-state.js';
import { termValues } from './terms.js';

/** Most Gauss–Newton iterations before giving up (with a warning). */
const MAX_ITERATIONS = 50;

/** The second-order solution of {@link solveSecondOrder}. */
export interface SecondOrderSolution {
  /** φ-scaled concentrations ĉ, one per component. */
  concentrations: Float64Array;
  /** G W Gᵀ (components × components). */
  covarianceFactor: number[][];
  /** Iterations made (one more than the limit when it did not converge). */
  iterations: number;
  /** A note when the iteration did not converge. */
  warnings: string[];
}

/**
 * Solves for the concentrations of a model with second-order terms.
 *
 * @param state - prediction state of a model whose terms outnumber its components
 * @param thetaLinear - the linear estimate θ̂ = M y of every term
 * @returns ĉ, its covariance factor, the iterations and any warning
 * @throws Error from the QR solve when the Jacobian loses rank (estimates far beyond any calibration)
 */
export function solveSecondOrder(state: ClsState, thetaLinear: Float64Array): SecondOrderSolution {
  const { terms, responseFactor } = state;
  const p = state.componentCount;
  const q = terms.length;
  let c: Float64Array = thetaLinear.slice(0, p);
  const warnings: string[] = [];
  const z = responseFactor.map((row) => dot(row, thetaLinear));
  /** The i-th entry of z − R θ(c) (R upper triangular). */
  const residualAt = (theta: Float64Array, i: number): number => {
    let model = 0;
    for (let k = i; k < q; k++) model += responseFactor[i]![k]! * theta[k]!;
    return z[i]! - model;
  };
  const objective = (candidate: ArrayLike<number>): number => {
    const theta = termValues(terms, candidate);
    let sum = 0;
    for (let i = 0; i < q; i++) sum += residualAt(theta, i) ** 2;
    return sum;
  };
  const jacobian = (candidate: ArrayLike<number>): number[][] => {
    // J = R D, D = ∂θ/∂c (q × p)
    const derivative = terms.map((term) => {
      const row = new Array<number>(p).fill(0);
      row[term.component] = term.power === 1 ? 1 : 2 * candidate[term.component]!;
      return row;
    });
    return multiply(responseFactor, derivative);
  };
  let current = objective(c);
  let converged = false;
  let iterations: number;
  for (iterations = 1; iterations <= MAX_ITERATIONS; iterations++) {
    const theta = termValues(terms, c);
    const residual = z.map((_, i) => [residualAt(theta, i)]);
    const step = solveByQr(jacobian(c), residual).map((row) => row[0]!);
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
  if (!converged)
    warnings.push(`second-order solution: Gauss–Newton did not converge in ${MAX_ITERATIONS} iterations`);
  const pseudoInverse = solveByQr(jacobian(c), identity(q)); // p × q
  return {
    concentrations: c,
    covarianceFactor: multiply(multiply(pseudoInverse, state.noiseGram), transpose(pseudoInverse)),
    iterations,
    warnings,
  };
}
