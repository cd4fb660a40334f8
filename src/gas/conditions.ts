/**
 * Cell conditions (path length, temperature, pressure) and the number-density scaling of
 * responses between conditions.
 *
 * At a fixed mole fraction x the absorber number density is N = x·P/(k·T) (ideal gas), and
 * Beer–Lambert makes absorbance proportional to N·L. So a response measured at (L, T, P) is
 * brought to reference conditions by dividing it by
 *   φ = (L / L_ref) · (P / P_ref) · (T_ref / T)          (DESIGN §3; common practice)
 * This is exact for integrated band areas in the weak-absorption limit and holds for peak
 * heights only near the reference temperature and pressure (line shapes change with T and P),
 * hence the `conditions-far` flag.
 */
import { BandwrightError, assertPositive, type ParameterWording } from '../errors.js';

/** Conditions of the gas in the cell. */
export interface CellConditions {
  /** Optical path length, m. */
  pathLength_m: number;
  /** Gas temperature, K. */
  temperature_K: number;
  /** Gas pressure, kPa. */
  pressure_kPa: number;
}

/** Where each condition came from, in the order they are looked for. */
export type ConditionSource = 'manifest' | 'scan' | 'option';

/** Conditions plus the source of each value. */
export interface ResolvedConditions extends CellConditions {
  /** Where each field was found. */
  sources: { pathLength_m: ConditionSource; temperature_K: ConditionSource; pressure_kPa: ConditionSource };
}

/** Partial conditions from one place. */
export type PartialConditions = Partial<CellConditions>;

const FIELDS = ['pathLength_m', 'temperature_K', 'pressure_kPa'] as const;
/** Where each quantity can be given; the default conditions' option as the caller names it. */
const DESCRIPTION: Record<(typeof FIELDS)[number], ParameterWording> = {
  pathLength_m: (name) =>
    `path length (manifest column path_length_m, JCAMP-DX ##PATH LENGTH, option ${name('pathLength_m')})`,
  temperature_K: (name) =>
    'temperature (manifest column temperature_K or temperature_C, JCAMP-DX ##TEMPERATURE, ' +
    `option ${name('temperature_K')})`,
  pressure_kPa: (name) =>
    `pressure (manifest column pressure_kPa, JCAMP-DX ##PRESSURE, option ${name('pressure_kPa')})`,
};

/**
 * Resolves the conditions of one scan: each value from the manifest row first, then the scan's
 * own metadata, then command-line options. A value missing everywhere is an error, never a
 * silent default.
 *
 * @param sources - partial conditions from the manifest row, the scan file and the options
 * @param where - the scan, for messages (e.g. `standards.csv line 3 (co-050a.jdx)`)
 * @returns complete conditions with the source of each field
 * @throws BandwrightError `CONDITIONS_MISSING` naming the missing quantity and where it can be given;
 *   `INVALID_VALUE` for a non-positive or non-finite value
 */
export function resolveConditions(
  sources: { manifest?: PartialConditions; scan?: PartialConditions; options?: PartialConditions },
  where: string,
): ResolvedConditions {
  const result: Partial<CellConditions> = {};
  const found: Partial<Record<(typeof FIELDS)[number], ConditionSource>> = {};
  for (const field of FIELDS) {
    for (const source of ['manifest', 'scan', 'option'] as const) {
      const bag = source === 'option' ? sources.options : sources[source];
      const value = bag?.[field];
      if (value === undefined) continue;
      result[field] = assertPositive(value, { file: where, parameter: field });
      found[field] = source;
      break;
    }
    if (result[field] === undefined) {
      throw new BandwrightError(
        'CONDITIONS_MISSING',
        (name) => `${where}: no ${DESCRIPTION[field](name)} is given; give it in one of those places`,
        { file: where, parameter: field },
      );
    }
  }
  return {
    pathLength_m: result.pathLength_m as number,
    temperature_K: result.temperature_K as number,
    pressure_kPa: result.pressure_kPa as number,
    sources: found as ResolvedConditions['sources'],
  };
}

/**
 * The number-density × path factor φ of a scan relative to reference conditions.
 *
 * @param conditions - the scan's conditions
 * @param reference - the calibration's reference conditions
 * @returns φ = (L/L_ref)(P/P_ref)(T_ref/T), dimensionless
 */
export function densityPathFactor(conditions: CellConditions, reference: CellConditions): number {
  return (
    (conditions.pathLength_m / reference.pathLength_m) *
    (conditions.pressure_kPa / reference.pressure_kPa) *
    (reference.temperature_K / conditions.temperature_K)
  );
}

/** How far from the reference a scan may be before it is flagged `conditions-far`. */
export interface ConditionsTolerance {
  /** Largest temperature difference, K (default 10). */
  temperature_K: number;
  /** Largest relative pressure difference (default 0.05 = 5 %). */
  pressureFraction: number;
}

/**
 * Default tolerance: ±10 K and ±5 % in pressure, about the spread of usual cell conditions
 * (725–795 mmHg and 10–30 °C, NIOSH 3800); beyond that line widths and the rotational envelope
 * change enough that φ scaling alone is not to be trusted for peak heights or saturated bands.
 */
export const DEFAULT_CONDITIONS_TOLERANCE: ConditionsTolerance = {
  temperature_K: 10,
  pressureFraction: 0.05,
};

/**
 * Says whether a scan's temperature or pressure is far from the calibration's reference.
 *
 * @param conditions - the scan's conditions
 * @param reference - the calibration's reference conditions
 * @param tolerance - limits (defaults: ±10 K, ±5 %)
 * @returns a list of plain-words reasons; empty when the scan is near the reference
 */
export function conditionsFarReasons(
  conditions: CellConditions,
  reference: CellConditions,
  tolerance: ConditionsTolerance = DEFAULT_CONDITIONS_TOLERANCE,
): string[] {
  const reasons: string[] = [];
  const dT = conditions.temperature_K - reference.temperature_K;
  if (Math.abs(dT) > tolerance.temperature_K) {
    reasons.push(
      `temperature ${conditions.temperature_K.toFixed(2)} K is ${Math.abs(dT).toFixed(1)} K ` +
        `from the calibration's ${reference.temperature_K.toFixed(2)} K ` +
        `(limit ±${tolerance.temperature_K} K)`,
    );
  }
  const dP = conditions.pressure_kPa / reference.pressure_kPa - 1;
  if (Math.abs(dP) > tolerance.pressureFraction) {
    reasons.push(
      `pressure ${conditions.pressure_kPa.toFixed(2)} kPa is ${(Math.abs(dP) * 100).toFixed(1)} % ` +
        `from the calibration's ${reference.pressure_kPa.toFixed(2)} kPa ` +
        `(limit ±${(tolerance.pressureFraction * 100).toFixed(0)} %)`,
    );
  }
  return reasons;
}

/**
 * Chooses reference conditions for a set of standards: the median of each quantity, so that φ is
 * close to 1 for typical standards.
 *
 * @param conditions - the standards' conditions (at least one)
 * @returns the reference conditions
 * @throws BandwrightError `INSUFFICIENT_DATA` for an empty list
 */
export function medianConditions(conditions: readonly CellConditions[]): CellConditions {
  if (conditions.length === 0)
    throw new BandwrightError('INSUFFICIENT_DATA', 'no standards to take reference conditions from');
  const median = (values: number[]): number => {
    const sorted = [...values].sort((a, b) => a - b);
    const mid = sorted.length >> 1;
    return sorted.length % 2 === 1
      ? (sorted[mid] as number)
      : ((sorted[mid - 1] as number) + (sorted[mid] as number)) / 2;
  };
  return {
    pathLength_m: median(conditions.map((c) => c.pathLength_m)),
    temperature_K: median(conditions.map((c) => c.temperature_K)),
    pressure_kPa: median(conditions.map((c) => c.pressure_kPa)),
  };
}
