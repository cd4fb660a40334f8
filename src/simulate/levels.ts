/**
 * Energy levels and partition sums of the simulator's molecules: Herzberg term values of a
 * diatomic, band origins, and internal partition sums by direct summation over v and J (not the
 * high-temperature approximation), with the harmonic vibrational sum for polyatomics.
 */
import {
  SECOND_RADIATION_CONSTANT_CM_K as C2,
  type DiatomicConstants,
  type LinearBandConstants,
  type VibrationalMode,
} from './constants.js';
// ---------------------------------------------------------------------------------------------
// Term values

const half = (v: number): number => v + 0.5;

/**
 * Vibrational term value G(v) = ωe(v+½) − ωexe(v+½)² + ωeye(v+½)³ + ωeze(v+½)⁴.
 *
 * @param constants - diatomic constants, cm⁻¹
 * @param v - vibrational quantum number
 * @returns G(v), cm⁻¹
 */
export function vibrationalTerm(constants: DiatomicConstants, v: number): number {
  const x = half(v);
  return constants.we * x - constants.wexe * x ** 2 + constants.weye * x ** 3 + constants.weze * x ** 4;
}

/**
 * Rotational constant B_v = Be − αe(v+½) + γe(v+½)².
 *
 * @param constants - diatomic constants, cm⁻¹
 * @param v - vibrational quantum number
 * @returns B_v, cm⁻¹
 */
export function rotationalConstant(constants: DiatomicConstants, v: number): number {
  const x = half(v);
  return constants.Be - constants.alphae * x + constants.gammae * x ** 2;
}

/**
 * Centrifugal distortion constant D_v = De + βe(v+½).
 *
 * @param constants - diatomic constants, cm⁻¹
 * @param v - vibrational quantum number
 * @returns D_v, cm⁻¹
 */
export function centrifugalConstant(constants: DiatomicConstants, v: number): number {
  return constants.De + constants.betae * half(v);
}

/**
 * Rotational term value F_v(J) = B_v·J(J+1) − D_v·J²(J+1)².
 *
 * @param constants - diatomic constants, cm⁻¹
 * @param v - vibrational quantum number
 * @param J - rotational quantum number
 * @returns F_v(J), cm⁻¹
 */
export function rotationalTerm(constants: DiatomicConstants, v: number, J: number): number {
  const x = J * (J + 1);
  return rotationalConstant(constants, v) * x - centrifugalConstant(constants, v) * x * x;
}

/**
 * Band origin of a fundamental: G(1) − G(0) for diatomic constants, or the tabulated origin of a
 * linear-molecule band.
 *
 * @param constants - diatomic constants or linear band constants
 * @returns ν0, cm⁻¹
 * @example
 * bandOrigin(CARBON_MONOXIDE_12C16O) // ≈ 2143.271 cm⁻¹
 */
export function bandOrigin(constants: DiatomicConstants | LinearBandConstants): number {
  if ('bandOrigin_cm' in constants) return constants.bandOrigin_cm;
  return vibrationalTerm(constants, 1) - vibrationalTerm(constants, 0);
}

// ---------------------------------------------------------------------------------------------
// Partition sums

/** Highest J summed; far beyond any population that matters below 3000 K for these molecules. */
export const J_LIMIT = 400;
/** Relative size below which a partition-sum term (or a line) is dropped. */
export const NEGLIGIBLE = 1e-13;

/** Sums f(J) for J = start, start+1, … until the terms are negligible past their maximum. */
export function sumOverJ(start: number, term: (J: number) => number): number {
  let sum = 0;
  let largest = 0;
  for (let J = start; J <= J_LIMIT + start; J++) {
    const value = term(J);
    sum += value;
    if (value > largest) largest = value;
    else if (value < NEGLIGIBLE * sum) break;
  }
  return sum;
}

/** Highest v whose levels still climb (the expansion stays physical) and are populated. */
export function vibrationalLevels(constants: DiatomicConstants, temperature_K: number): number[] {
  const g0 = vibrationalTerm(constants, 0);
  const levels: number[] = [];
  let previous = -Infinity;
  for (let v = 0; v < 60; v++) {
    const energy = vibrationalTerm(constants, v) - g0;
    if (!(energy > previous)) break;
    if (v > 0 && Math.exp((-C2 * energy) / temperature_K) < NEGLIGIBLE) break;
    levels.push(v);
    previous = energy;
  }
  return levels;
}

/**
 * Partition sums of a diatomic ¹Σ state by direct summation over levels.
 *
 * @param constants - diatomic constants, cm⁻¹
 * @param temperature_K - K
 * @returns `rotational`: Σ_J (2J+1)·exp(−c₂F₀(J)/T) in v = 0; `total`: the sum over v and J of
 *   (2J+1)·exp(−c₂[G(v) − G(0) + F_v(J)]/T)
 * @example
 * diatomicPartitionSum(CARBON_MONOXIDE_12C16O, 296).rotational // ≈ 107.4 (≈ T/(c₂B₀) + 1/3)
 */
export function diatomicPartitionSum(
  constants: DiatomicConstants,
  temperature_K: number,
): { rotational: number; total: number } {
  const g0 = vibrationalTerm(constants, 0);
  let total = 0;
  let rotational = 0;
  for (const v of vibrationalLevels(constants, temperature_K)) {
    const gv = vibrationalTerm(constants, v) - g0;
    const sum = sumOverJ(
      0,
      (J) => (2 * J + 1) * Math.exp((-C2 * (gv + rotationalTerm(constants, v, J))) / temperature_K),
    );
    if (v === 0) rotational = sum;
    total += sum;
  }
  return { rotational, total };
}

/**
 * Harmonic vibrational partition sum Π (1 − exp(−c₂ω/T))^(−d) (common practice).
 *
 * @param modes - normal modes with degeneracies, cm⁻¹
 * @param temperature_K - K
 */
export function harmonicVibrationalPartitionSum(
  modes: readonly VibrationalMode[],
  temperature_K: number,
): number {
  let q = 1;
  for (const mode of modes)
    q *= (1 - Math.exp((-C2 * mode.wavenumber_cm) / temperature_K)) ** -mode.degeneracy;
  return q;
}

/** Rotational energy of a linear molecule's state, cm⁻¹. */
export function linearTerm(B: number, D: number, J: number): number {
  const x = J * (J + 1);
  return B * x - D * x * x;
}

/**
 * Rotational partition sum of a linear molecule's ground state, with its nuclear-spin
 * restriction (only even J for ¹²C¹⁶O₂).
 *
 * @param constants - linear band constants (lower state)
 * @param temperature_K - K
 */
export function linearRotationalPartitionSum(constants: LinearBandConstants, temperature_K: number): number {
  const step = constants.lowerStateJ === 'even' ? 2 : 1;
  let sum = 0;
  let largest = 0;
  for (let J = 0; J <= J_LIMIT; J += step) {
    const value =
      (2 * J + 1) * Math.exp((-C2 * linearTerm(constants.lowerB, constants.lowerD, J)) / temperature_K);
    sum += value;
    if (value > largest) largest = value;
    else if (value < NEGLIGIBLE * sum) break;
  }
  return sum;
}
