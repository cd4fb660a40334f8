/**
 * Safety cautions and user-supplied exposure limits.
 *
 * The tool is not a life-safety monitor. Whenever a calibration or result involves a toxic or
 * asphyxiant gas, outputs carry a caution that defers to local exposure limits, licensed
 * industrial-hygiene practice and the standards' safety data sheets (DESIGN §3 Safety).
 */
import { BandwrightError } from '../errors.js';
import { findSpecies, needsCaution, type Species } from './species.js';
import { ppmToMgPerM3, toPpm, type ConcentrationUnit } from './units.js';

/** General caution for compressed-gas standards and the cell, shown once per output. */
export const GENERAL_CAUTION =
  'bandwright is not a life-safety monitor. Compare results with the exposure limits that apply ' +
  'where you work, follow licensed industrial-hygiene practice, vent the gas cell to a safe place, ' +
  "and handle standards' cylinders (high pressure, toxic contents) as their safety data sheets say.";

/**
 * The hazard statement for one gas, or undefined when the gas needs none.
 *
 * @param species - the gas
 * @returns plain words naming the hazards, e.g. `CO (carbon monoxide) is toxic. CO is colourless and odourless.`
 */
export function cautionFor(species: Species): string | undefined {
  if (!needsCaution(species)) return undefined;
  const hazards = species.hazards.filter((h) => h === 'toxic' || h === 'asphyxiant').join(' and ');
  const note = species.cautionNote === undefined ? '' : ` ${species.cautionNote}`;
  return `${species.name} (${species.commonName}) is ${hazards}.${note}`;
}

/**
 * Cautions for a set of gas names: one hazard line per hazardous gas, without repeats, then the
 * general caution once (nothing when no gas needs a caution).
 *
 * @param gases - gas names (unknown names are ignored here; they are refused elsewhere)
 */
export function cautionsFor(gases: readonly string[]): string[] {
  const seen = new Set<string>();
  const out: string[] = [];
  for (const name of gases) {
    const species = findSpecies(name);
    if (species === undefined || seen.has(species.name)) continue;
    seen.add(species.name);
    const caution = cautionFor(species);
    if (caution !== undefined) out.push(caution);
  }
  return out.length === 0 ? out : [...out, GENERAL_CAUTION];
}

/** Units an exposure limit may be given in. */
export type LimitUnit = ConcentrationUnit | 'mg/m3';

/** One user-supplied exposure limit (a row of a limits file). */
export interface ExposureLimit {
  /** Gas name as in the species table. */
  gas: string;
  /** Limit value in `unit`. */
  limit: number;
  /**
   * Unit of the limit; mg/m³ are taken at 25 °C and 101.325 kPa (the usual hygiene convention,
   * NIOSH Pocket Guide).
   */
  unit: LimitUnit;
  /** What the limit is, e.g. `TWA 8 h`, `ceiling`, `IDLH`. */
  basis: string;
  /** Where the value comes from (publication, regulation). */
  source: string;
}

/**
 * 25 °C, 101.325 kPa: the state at which hygiene limits in mg/m³ are stated (NIOSH Pocket Guide;
 * common practice).
 */
const HYGIENE_STATE = { temperature_K: 298.15, pressure_kPa: 101.325 };

/**
 * An exposure limit in ppm.
 *
 * @param limit - the limit
 * @returns ppm
 * @throws BandwrightError `UNKNOWN_GAS` when a mg/m³ limit names a gas without a molar mass
 */
export function limitInPpm(limit: ExposureLimit): number {
  if (limit.unit !== 'mg/m3') return toPpm(limit.limit, limit.unit);
  const species = findSpecies(limit.gas);
  if (species === undefined)
    throw new BandwrightError(
      'UNKNOWN_GAS',
      `limit for ${JSON.stringify(limit.gas)}: gas not in the species table, cannot convert mg/m3 to ppm`,
    );
  return limit.limit / ppmToMgPerM3(1, species.molarMass_g_mol, HYGIENE_STATE);
}

/**
 * The limits a result exceeds, judged on the upper end of its prediction interval (so a result
 * whose interval reaches over the limit is flagged even when its central value is below it).
 *
 * @param gas - gas name
 * @param highPpm - upper end of the prediction interval, ppm
 * @param limits - all user limits
 * @returns the limits exceeded, with a plain-words description each
 */
export function exceededLimits(
  gas: string,
  highPpm: number,
  limits: readonly ExposureLimit[],
): { limit: ExposureLimit; message: string }[] {
  const name = findSpecies(gas)?.name ?? gas;
  return limits
    .filter((limit) => (findSpecies(limit.gas)?.name ?? limit.gas) === name)
    .filter((limit) => highPpm > limitInPpm(limit))
    .map((limit) => ({
      limit,
      message:
        `${name}: the interval reaches ${highPpm.toPrecision(4)} ppm, above the ${limit.basis} limit ` +
        `of ${limit.limit} ${limit.unit} (${limit.source}); local rules govern`,
    }));
}
