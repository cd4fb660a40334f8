/**
 * Physical constants and the molecular data behind the simulator.
 *
 * Every molecular constant carries its source in a comment and in the data (`source`); "from
 * memory" marks a value recalled rather than read from the publication at the time of writing.
 * Wavenumber constants are in cm⁻¹ throughout.
 *
 * Not modelled, and why:
 * - Herman–Wallis factors (the rotational dependence of the transition moment): no sourced
 *   coefficients were at hand, so line intensities follow the rigid Hönl–London pattern. For the
 *   CO fundamental this changes single lines by roughly a percent at J ≈ 10 (from memory) and
 *   leaves the band sum unchanged by construction.
 * - Hot bands (transitions from excited vibrational levels): the lower level's population is
 *   removed from the fundamental through the vibrational partition function, but the hot-band
 *   lines themselves are not listed. For CO at 296 K the v = 1 population is 3e-5; for CO₂ the
 *   01¹1 ← 01¹0 band near 2336 cm⁻¹ carries several percent of the ν₃ absorption and is missing.
 * - Minor isotopologues other than H³⁷Cl (¹³CO, ¹³CO₂ …); pressure shifts; self-broadening;
 *   line mixing; far-wing (sub-Lorentzian) corrections.
 */

/** Boltzmann constant, J/K (CODATA / SI 2019, exact). */
export const BOLTZMANN_J_K = 1.380649e-23;
/** Avogadro constant, 1/mol (SI 2019, exact). */
export const AVOGADRO_PER_MOL = 6.02214076e23;
/** Speed of light in vacuum, m/s (SI, exact). */
export const SPEED_OF_LIGHT_M_S = 299_792_458;
/** Second radiation constant c₂ = hc/k, cm·K (CODATA 2018). */
export const SECOND_RADIATION_CONSTANT_CM_K = 1.438776877;
/** Reference temperature of line-strength and broadening data, K (standard line-list practice). */
export const REFERENCE_TEMPERATURE_K = 296;
/** Reference pressure of broadening coefficients, kPa (1 atm). */
export const REFERENCE_PRESSURE_KPA = 101.325;

/**
 * Spectroscopic constants of a diatomic electronic state in the Herzberg (Dunham-like)
 * expansion, cm⁻¹:
 *   G(v) = ωe(v+½) − ωexe(v+½)² + ωeye(v+½)³ + ωeze(v+½)⁴
 *   B_v = Be − αe(v+½) + γe(v+½)²,  D_v = De + βe(v+½)
 *   F_v(J) = B_v·J(J+1) − D_v·J²(J+1)²
 * Field names are the trade's ASCII spellings of ωe, ωexe, …, Be, αe, γe, De, βe.
 */
export interface DiatomicConstants {
  /** Isotopologue, e.g. `¹²C¹⁶O`. */
  molecule: string;
  /** ωe, cm⁻¹. */
  we: number;
  /** ωexe, cm⁻¹. */
  wexe: number;
  /** ωeye, cm⁻¹. */
  weye: number;
  /** ωeze, cm⁻¹. */
  weze: number;
  /** Be, cm⁻¹. */
  Be: number;
  /** αe, cm⁻¹. */
  alphae: number;
  /** γe, cm⁻¹. */
  gammae: number;
  /** De, cm⁻¹. */
  De: number;
  /** βe, cm⁻¹. */
  betae: number;
  /** Where each value comes from. */
  source: string;
}

/**
 * A ²Π ground state treated in a simplified Hund's case (a): two spin–orbit components Ω = ½
 * and 3/2 separated by A, rotational levels B_v[J(J+1) − Ω²], Λ-doubling neglected.
 */
export interface PiStateConstants extends DiatomicConstants {
  /** Spin–orbit constant A, cm⁻¹ (the Ω = 3/2 component lies A above Ω = ½ for a regular state). */
  spinOrbitA: number;
}

/**
 * One vibrational band of a linear polyatomic molecule, given as a band origin with lower- and
 * upper-state rotational constants (Σ–Σ parallel band: P and R branches, no Q).
 */
export interface LinearBandConstants {
  /** Isotopologue, e.g. `¹²C¹⁶O₂`. */
  molecule: string;
  /** Band label, e.g. `ν3 (00⁰1 ← 00⁰0)`. */
  band: string;
  /** Band origin ν0, cm⁻¹. */
  bandOrigin_cm: number;
  /** Lower-state B″, cm⁻¹. */
  lowerB: number;
  /** Upper-state B′, cm⁻¹. */
  upperB: number;
  /** Lower-state D″, cm⁻¹. */
  lowerD: number;
  /** Upper-state D′, cm⁻¹. */
  upperD: number;
  /**
   * Which lower-state J exist. `even`: nuclear-spin statistics of a symmetric molecule with
   * spin-0 end nuclei (¹²C¹⁶O₂ ground state: only even J; common practice).
   */
  lowerStateJ: 'all' | 'even';
  /** Where each value comes from. */
  source: string;
}

/** A harmonic normal mode, for vibrational partition functions. */
export interface VibrationalMode {
  /** Fundamental wavenumber, cm⁻¹. */
  wavenumber_cm: number;
  /** Degeneracy (2 for a bending mode of a linear molecule, 3 for an F₂ mode of CH₄). */
  degeneracy: number;
}

/** Air broadening of a gas's lines. */
export interface Broadening {
  /** Air-broadened Lorentz HWHM at 296 K and 1 atm, cm⁻¹/atm. */
  airBroadening_cm_atm: number;
  /** Temperature exponent n of γ(T) = γ(296 K)·(296/T)^n. */
  temperatureExponent: number;
  /** Where the values come from. */
  source: string;
}

/** An integrated band strength (sum of line intensities) at 296 K. */
export interface BandStrength {
  /** cm/molecule, per molecule of the gas as named (all isotopologues together). */
  value_cm_per_molecule: number;
  /** Where it comes from. */
  source: string;
}

// ---------------------------------------------------------------------------------------------
// Diatomic constants

/**
 * ¹²C¹⁶O X¹Σ⁺. ωe, ωexe, ωeye, Be, αe: Huber & Herzberg 1979 via the NIST WebBook (facts.md,
 * from memory). De = 6.12e-6 cm⁻¹: Huber & Herzberg, from memory.
 */
export const CARBON_MONOXIDE_12C16O: DiatomicConstants = {
  molecule: '¹²C¹⁶O',
  we: 2169.81358, // Huber & Herzberg 1979 (facts.md), from memory
  wexe: 13.28831, // Huber & Herzberg 1979 (facts.md), from memory
  weye: 0.01051, // Huber & Herzberg 1979 (facts.md), from memory
  weze: 0,
  Be: 1.93128087, // Huber & Herzberg 1979 (facts.md), from memory
  alphae: 0.01750441, // Huber & Herzberg 1979 (facts.md), from memory
  gammae: 0,
  De: 6.12147e-6, // Huber & Herzberg 1979, from memory
  betae: 0,
  source:
    'ωe, ωexe, ωeye, Be, αe: Huber & Herzberg 1979 (NIST WebBook), facts.md, from memory; ' +
    'De: Huber & Herzberg 1979, from memory',
};

/**
 * H³⁵Cl X¹Σ⁺. ωe, ωexe, Be, αe: Huber & Herzberg (facts.md, from memory); ωeye = 0.2243,
 * ωeze = −0.0122, De = 5.3194e-4: Huber & Herzberg, from memory. With ωeze the band origin
 * comes to 2885.98 cm⁻¹ (facts.md: ν0 ≈ 2885.98).
 */
export const HYDROGEN_CHLORIDE_H35CL: DiatomicConstants = {
  molecule: 'H³⁵Cl',
  we: 2990.946, // Huber & Herzberg (facts.md), from memory
  wexe: 52.8186, // Huber & Herzberg (facts.md), from memory
  weye: 0.2243, // Huber & Herzberg, from memory
  weze: -0.0122, // Huber & Herzberg, from memory
  Be: 10.5934, // Huber & Herzberg (facts.md), from memory
  alphae: 0.3072, // Huber & Herzberg (facts.md), from memory
  gammae: 0,
  De: 5.3194e-4, // Huber & Herzberg, from memory
  betae: 0,
  source:
    'ωe, ωexe, Be, αe: Huber & Herzberg (facts.md), from memory; ωeye, ωeze, De: Huber & Herzberg, from memory',
};

/**
 * Atomic masses, u (atomic mass evaluation; from memory), for reduced masses of isotopologues.
 */
export const ATOMIC_MASS_U = {
  H1: 1.00782503207,
  Cl35: 34.96885268,
  Cl37: 36.96590259,
} as const;

/**
 * Constants of another isotopologue by the isotope relations (ρ = √(μ/μᵢ)):
 * ωe ∝ ρ, ωexe ∝ ρ², ωeye ∝ ρ³, ωeze ∝ ρ⁴, Be ∝ ρ², αe ∝ ρ³,
 * γe ∝ ρ⁴, De ∝ ρ⁴, βe ∝ ρ⁵ (Born–Oppenheimer mass scaling; common practice).
 *
 * @param constants - the reference isotopologue
 * @param rho - √(μ_reference/μ_other), dimensionless
 * @param molecule - label of the new isotopologue
 */
export function isotopeScaledConstants(
  constants: DiatomicConstants,
  rho: number,
  molecule: string,
): DiatomicConstants {
  return {
    molecule,
    we: constants.we * rho,
    wexe: constants.wexe * rho ** 2,
    weye: constants.weye * rho ** 3,
    weze: constants.weze * rho ** 4,
    Be: constants.Be * rho ** 2,
    alphae: constants.alphae * rho ** 3,
    gammae: constants.gammae * rho ** 4,
    De: constants.De * rho ** 4,
    betae: constants.betae * rho ** 5,
    source:
      `${constants.molecule} constants scaled by the isotope relations with ρ = ${rho.toFixed(7)} ` +
      `(common practice); ${constants.source}`,
  };
}

const reducedMass = (a: number, b: number): number => (a * b) / (a + b);
const RHO_H37CL = Math.sqrt(
  reducedMass(ATOMIC_MASS_U.H1, ATOMIC_MASS_U.Cl35) / reducedMass(ATOMIC_MASS_U.H1, ATOMIC_MASS_U.Cl37),
);

/** H³⁷Cl X¹Σ⁺, from {@link HYDROGEN_CHLORIDE_H35CL} by the isotope relations. */
export const HYDROGEN_CHLORIDE_H37CL: DiatomicConstants = isotopeScaledConstants(
  HYDROGEN_CHLORIDE_H35CL,
  RHO_H37CL,
  'H³⁷Cl',
);

/**
 * ¹⁴N¹⁶O X²Π (regular, Ω = ½ lowest). ωe, ωexe, Be, αe: Huber & Herzberg (facts.md, from
 * memory); De = 0.5e-6 and A = 123.1 cm⁻¹: Huber & Herzberg, from memory. ωeye not used.
 */
export const NITRIC_OXIDE_14N16O: PiStateConstants = {
  molecule: '¹⁴N¹⁶O',
  we: 1904.2, // Huber & Herzberg (facts.md), from memory
  wexe: 14.075, // Huber & Herzberg (facts.md), from memory
  weye: 0,
  weze: 0,
  Be: 1.672, // Huber & Herzberg (facts.md), from memory
  alphae: 0.0171, // Huber & Herzberg (facts.md), from memory
  gammae: 0,
  De: 0.5e-6, // Huber & Herzberg, from memory
  betae: 0,
  spinOrbitA: 123.1, // Huber & Herzberg, from memory
  source: 'ωe, ωexe, Be, αe: Huber & Herzberg (facts.md), from memory; De, A: Huber & Herzberg, from memory',
};

// ---------------------------------------------------------------------------------------------
// Linear polyatomic bands

/** ¹²C¹⁶O₂ ν₃ (00⁰1 ← 00⁰0). Band origin and rotational constants from memory. */
export const CARBON_DIOXIDE_NU3: LinearBandConstants = {
  molecule: '¹²C¹⁶O₂',
  band: 'ν3 (00⁰1 ← 00⁰0)',
  bandOrigin_cm: 2349.143, // from memory (facts.md: ν3 2349.1)
  lowerB: 0.390219, // ground state B″, from memory
  upperB: 0.387141, // 00⁰1 B′, from memory
  lowerD: 1.333e-7, // from memory
  upperD: 1.331e-7, // from memory
  lowerStateJ: 'even', // ¹⁶O has nuclear spin 0: only even J in the Σg⁺ ground state (common practice)
  source:
    'ν0 = 2349.143, B″ = 0.390219, B′ = 0.387141, D″ ≈ D′ ≈ 1.33e-7 cm⁻¹: from memory ' +
    '(facts.md gives ν3 ≈ 2349.1); even-J-only ground state: nuclear-spin statistics, common practice',
};

/** ¹⁴N₂¹⁶O ν₃ (00⁰1 ← 00⁰0). Band origin and rotational constants from memory. */
export const NITROUS_OXIDE_NU3: LinearBandConstants = {
  molecule: '¹⁴N₂¹⁶O',
  band: 'ν3 (00⁰1 ← 00⁰0)',
  bandOrigin_cm: 2223.757, // from memory (facts.md: ν3 2224)
  lowerB: 0.419011, // from memory
  upperB: 0.415559, // from memory
  lowerD: 1.76e-7, // from memory
  upperD: 1.75e-7, // from memory
  lowerStateJ: 'all', // NNO has no exchange symmetry
  source:
    'ν0 = 2223.757, B″ = 0.419011, B′ = 0.415559, D″ ≈ D′ ≈ 1.75e-7 cm⁻¹: from memory ' +
    '(facts.md gives ν3 ≈ 2224)',
};

// ---------------------------------------------------------------------------------------------
// Gas models
