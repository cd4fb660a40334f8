/**
 * Concentration units and stack-reporting conversions.
 *
 * - ppm = µmol/mol; 1 ppm = 1000 ppb = 1e-4 % (common practice).
 * - Column amount ppm·m = ppm × path length in m.
 * - Mass concentration at (T_n, P_n): mg/m³ = ppm · M · P_n / (R · T_n) · 10⁻³, with M in g/mol and
 *   P_n in Pa (ideal gas; R = 8.314462618 J/(mol·K), CODATA 2018).
 * - Dry basis: c_dry = c_wet / (1 − x_H2O) (common practice).
 * - Oxygen reference: c_ref = c · (O2_air − O2_ref) / (O2_air − O2_meas), O2_air = 20.9 % by
 *   default (40 CFR 60, e.g. §60.3076); some jurisdictions use 21 %.
 */
import { BandwrightError, assertFinite, assertPositive } from '../errors.js';

/** Molar gas constant, J/(mol·K) (CODATA 2018, exact since the 2019 SI). */
export const GAS_CONSTANT = 8.314462618;

/** Concentration units accepted in manifests and methods. */
export type ConcentrationUnit = 'ppm' | 'ppb' | 'pct';

/** All concentration units. */
export const CONCENTRATION_UNITS: readonly ConcentrationUnit[] = ['ppm', 'ppb', 'pct'];

const PPM_PER_UNIT: Record<ConcentrationUnit, number> = { ppm: 1, ppb: 1e-3, pct: 1e4 };

/**
 * Parses a unit name as written in manifests (`ppm`, `ppb`, `pct`, `%`, case-insensitive).
 *
 * @param text - the unit text
 * @param where - parameter or column for the message
 * @throws BandwrightError `INVALID_VALUE` for other units
 */
export function parseConcentrationUnit(text: string, where: string): ConcentrationUnit {
  const key = text.trim().toLowerCase();
  if (key === '%' || key === 'percent') return 'pct';
  if ((CONCENTRATION_UNITS as readonly string[]).includes(key)) return key as ConcentrationUnit;
  throw new BandwrightError(
    'INVALID_VALUE',
    `${where}: unit ${JSON.stringify(text)} is not known, use ppm, ppb or pct`,
    { parameter: where },
  );
}

/** Label for printing: `ppm`, `ppb`, `%`. */
export function unitLabel(unit: ConcentrationUnit): string {
  return unit === 'pct' ? '%' : unit;
}

/**
 * Converts a concentration to ppm.
 *
 * @param value - concentration in `unit`
 * @param unit - its unit
 * @returns ppm (µmol/mol)
 */
export function toPpm(value: number, unit: ConcentrationUnit): number {
  return value * PPM_PER_UNIT[unit];
}

/**
 * Converts a concentration from ppm.
 *
 * @param ppm - concentration in ppm
 * @param unit - the target unit
 * @returns the value in `unit`
 */
export function fromPpm(ppm: number, unit: ConcentrationUnit): number {
  return ppm / PPM_PER_UNIT[unit];
}

/** Reference conditions for mass concentrations. */
export interface ReferenceState {
  /** Temperature, K. */
  temperature_K: number;
  /** Pressure, kPa. */
  pressure_kPa: number;
}

/** 0 °C and 101.325 kPa, the usual normal conditions for stack reporting (common practice). */
export const NORMAL_STATE: ReferenceState = { temperature_K: 273.15, pressure_kPa: 101.325 };

/**
 * Milligrams per cubic metre from a mole fraction, at stated reference conditions.
 *
 * @param ppm - mole fraction, ppm (µmol/mol)
 * @param molarMass_g_mol - molar mass of the gas, g/mol
 * @param state - reference temperature (K) and pressure (kPa)
 * @returns mg/m³ at `state`
 * @throws BandwrightError `INVALID_VALUE` for a non-positive temperature, pressure or molar mass
 * @example
 * ppmToMgPerM3(1, 28.010, { temperature_K: 273.15, pressure_kPa: 101.325 }); // ≈ 1.2497
 */
export function ppmToMgPerM3(ppm: number, molarMass_g_mol: number, state: ReferenceState): number {
  assertPositive(molarMass_g_mol, { parameter: 'molar mass' });
  assertPositive(state.temperature_K, { parameter: 'reference temperature' });
  assertPositive(state.pressure_kPa, { parameter: 'reference pressure' });
  return ((ppm * molarMass_g_mol * state.pressure_kPa * 1e3) / (GAS_CONSTANT * state.temperature_K)) * 1e-3;
}

/**
 * Molar volume of an ideal gas, L/mol.
 *
 * @param state - temperature (K) and pressure (kPa)
 */
export function molarVolume_L(state: ReferenceState): number {
  return ((GAS_CONSTANT * state.temperature_K) / (state.pressure_kPa * 1e3)) * 1e3;
}

/**
 * Converts a wet-basis concentration to dry basis.
 *
 * @param wet - concentration on a wet basis, any unit
 * @param waterFraction - water vapour mole fraction, 0 ≤ x < 1 (e.g. 0.12 for 12 %)
 * @returns concentration on a dry basis, same unit
 * @throws BandwrightError `CONVERSION` when the water fraction is outside [0, 1)
 */
export function toDryBasis(wet: number, waterFraction: number): number {
  assertFinite(waterFraction, { parameter: 'water fraction' });
  if (!(waterFraction >= 0 && waterFraction < 1)) {
    throw new BandwrightError(
      'CONVERSION',
      `water vapour fraction = ${waterFraction}, must be from 0 to below 1 (a mole fraction, not percent)`,
      { parameter: 'water fraction' },
    );
  }
  return wet / (1 - waterFraction);
}

/** Options for the oxygen reference correction. */
export interface OxygenCorrection {
  /** Measured O2, % by volume (same basis as the concentration, usually dry). */
  measured_pct: number;
  /** Reference O2 the result is corrected to, %. */
  reference_pct: number;
  /** O2 content of air, %, default 20.9. */
  air_pct?: number;
}

/** Smallest allowed gap between air O2 and measured O2, in % points, before the correction is refused. */
export const MIN_OXYGEN_GAP_PCT = 0.5;

/**
 * Corrects a concentration to a reference oxygen content.
 *
 * The factor (O2_air − O2_ref)/(O2_air − O2_meas) grows without bound as the measured O2
 * approaches air; below a gap of {@link MIN_OXYGEN_GAP_PCT} % points the result means nothing
 * (the stack is mostly air), so it is refused.
 *
 * @param value - concentration, any unit
 * @param correction - measured, reference and air O2 in %
 * @returns the concentration at the reference O2
 * @throws BandwrightError `CONVERSION` when measured O2 is within 0.5 % points of (or above) the air value,
 *   `INVALID_VALUE` for percentages outside 0–100
 * @example
 * correctToReferenceOxygen(100, { measured_pct: 10, reference_pct: 7 }); // 127.523…
 */
export function correctToReferenceOxygen(value: number, correction: OxygenCorrection): number {
  const air = correction.air_pct ?? 20.9;
  for (const [name, pct] of [
    ['measured O2', correction.measured_pct],
    ['reference O2', correction.reference_pct],
    ['O2 of air', air],
  ] as const) {
    assertFinite(pct, { parameter: name });
    if (pct < 0 || pct > 100)
      throw new BandwrightError('INVALID_VALUE', `${name} = ${pct} %, must be from 0 to 100`, {
        parameter: name,
      });
  }
  if (correction.reference_pct >= air) {
    throw new BandwrightError(
      'CONVERSION',
      `reference O2 = ${correction.reference_pct} %, must be below the O2 of air (${air} %)`,
      { parameter: 'reference O2' },
    );
  }
  if (air - correction.measured_pct < MIN_OXYGEN_GAP_PCT) {
    throw new BandwrightError(
      'CONVERSION',
      `measured O2 = ${correction.measured_pct} % is within ${MIN_OXYGEN_GAP_PCT} % points ` +
        `of the O2 of air (${air} %): the correction factor ` +
        `(${air} − ${correction.reference_pct})/(${air} − ${correction.measured_pct}) is meaningless there`,
      { parameter: 'measured O2' },
    );
  }
  return (value * (air - correction.reference_pct)) / (air - correction.measured_pct);
}
