/**
 * Results of quantification (DESIGN §4 "quantify --json"), and the decoration every result gets
 * whatever model made it: detection-limit, range and saturation flags, exposure-limit flags,
 * cautions, and stack-reporting conversions with their assumptions.
 */
import type { CellConditions } from '../gas/conditions.js';
import { exceededLimits, type ExposureLimit } from '../gas/safety.js';
import { findSpecies } from '../gas/species.js';
import {
  correctToReferenceOxygen,
  fromPpm,
  ppmToMgPerM3,
  toDryBasis,
  toPpm,
  type ConcentrationUnit,
  type ReferenceState,
} from '../gas/units.js';
import { BandwrightError } from '../errors.js';
import type { ReadWarning, ReadWarningCode } from '../spectrum/spectrum.js';

/** Result flags (DESIGN §4). */
export type ResultFlag =
  'below-lod' | 'below-loq' | 'extrapolated' | 'saturated' | 'poor-fit' | 'over-limit' | 'conditions-far';

/**
 * Codes of the warnings quantification itself adds to a scan's result (after the reader's):
 * - `interferent`: an interferent was modelled but is not reported (its estimate, and whether it
 *   lies outside the standards' range, which may bias the reported gases)
 * - `model`: a note from the model's prediction (e.g. the second-order solution did not converge)
 */
export type QuantifyWarningCode = 'interferent' | 'model';

/** Code of a result warning: one of the reader's ({@link ReadWarningCode}) or quantification's. */
export type ResultWarningCode = ReadWarningCode | QuantifyWarningCode;

/** A warning about a whole scan: a stable code for scripts and a message for people. */
export interface ResultWarning {
  /** Stable code. */
  code: ResultWarningCode;
  /** What was seen, naming the scan or file. */
  message: string;
}

/**
 * The read warnings a spectrum carries, as result warnings (copies, in file order).
 *
 * @param warnings - the spectrum's `metadata.warnings`
 */
export function readWarnings(warnings: readonly ReadWarning[] | undefined): ResultWarning[] {
  return (warnings ?? []).map((w) => ({ code: w.code, message: w.message }));
}

/** A derived value: another unit or basis, with the assumptions it rests on. */
export interface Conversion {
  /** What was done, e.g. `mg/m3`, `dry`, `O2-corrected`. */
  kind: string;
  /** Value in `unit`. */
  value: number;
  /** Lower end of the interval, same unit. */
  low: number;
  /** Upper end of the interval, same unit. */
  high: number;
  /** Unit label. */
  unit: string;
  /** Plain-words assumptions, always printed with the value. */
  assumption: string;
}

/** One gas in one scan. */
export interface GasResult {
  /** Canonical gas name. */
  gas: string;
  /** Concentration in `unit`. */
  value: number;
  /** Unit of value, low, high, se. */
  unit: ConcentrationUnit;
  /** Lower end of the prediction interval. */
  low: number;
  /** Upper end of the prediction interval. */
  high: number;
  /** Standard error of the value. */
  se: number;
  /** Flags raised. */
  flags: ResultFlag[];
  /** Column amount, ppm·m (value in ppm × the scan's path length in m). */
  columnAmount_ppm_m?: number;
  /** Detection limit used for `below-lod`, in `unit`, and its definition. */
  detectionLimit?: { value: number; definition: string };
  /** Determination limit used for `below-loq`, in `unit`. */
  determinationLimit?: { value: number; definition: string };
  /** Conversions asked for. */
  conversions?: Conversion[];
  /** Plain-words reasons behind the flags. */
  notes: string[];
}

/** All gases in one scan. */
export interface ScanResult {
  /** The scan as the user named it. */
  scan: string;
  /** Conditions used. */
  conditions: CellConditions;
  /** Per-gas results. */
  gases: GasResult[];
  /** RMS of the fit residual, AU (classical least squares), or of the baseline fit (band). */
  residualRms?: number;
  /** Safety cautions. */
  cautions: string[];
  /**
   * Warnings about the whole scan, not one gas: those from reading it first (file order), then
   * quantification's own (DESIGN §4 `warnings: [{code, message}]`).
   */
  warnings: ResultWarning[];
}

/** What the user asked for beyond concentrations. */
export interface ReportingOptions {
  /** Report mg/m³ at this state (temperature K, pressure kPa). */
  massConcentration?: ReferenceState;
  /**
   * Report on a dry basis: the water vapour mole fraction given (or measured in the same scan, then
   * `measuredInScan`); when omitted, H2O among the reported gases is used.
   */
  dryBasis?: { waterFraction?: number; measuredInScan?: boolean };
  /** Correct to a reference O2 (measured, reference, air in %). */
  oxygen?: { measured_pct: number; reference_pct: number; air_pct?: number };
  /** User exposure limits for the over-limit flag. */
  limits?: readonly ExposureLimit[];
  /** Unit to report concentrations in (default: the calibration's unit per gas). */
  unit?: ConcentrationUnit;
}

/**
 * Adds the stack-reporting conversions and exposure-limit flags to the gases of one scan.
 * Conversions chain in the usual order: dry basis, then O2 reference, then mg/m³.
 *
 * @param gases - results in their own units (mutated copies are returned, the input is untouched)
 * @param options - reporting options
 * @param pathLength_m - the scan's path length, m, for ppm·m
 * @returns new gas results
 * @throws BandwrightError `CONVERSION` when dry basis needs H2O that was not measured or given, or O2 is too near air
 */
export function decorateGases(
  gases: readonly GasResult[],
  options: ReportingOptions,
  pathLength_m: number,
): GasResult[] {
  let waterFraction = options.dryBasis?.waterFraction;
  let waterNote =
    waterFraction === undefined
      ? ''
      : `water vapour ${(waterFraction * 100).toFixed(2)} % ` +
        `${options.dryBasis?.measuredInScan ? 'measured in the same scan' : 'as given'}`;
  if (options.dryBasis !== undefined && waterFraction === undefined) {
    const water = gases.find((g) => g.gas === 'H2O');
    if (water === undefined) {
      throw new BandwrightError(
        'CONVERSION',
        (name) =>
          'dry basis asked for, but the calibration does not measure H2O in the scan; give the water vapour ' +
          `fraction (${name('waterFraction')})`,
        { parameter: 'waterFraction' },
      );
    }
    waterFraction = toPpm(water.value, water.unit) * 1e-6;
    waterNote = `water vapour ${(waterFraction * 100).toFixed(2)} % measured in the same scan`;
  }
  return gases.map((input) => {
    const gas: GasResult = { ...input, flags: [...input.flags], notes: [...input.notes] };
    const unit = options.unit ?? gas.unit;
    if (unit !== gas.unit) {
      const convert = (v: number): number => fromPpm(toPpm(v, gas.unit), unit);
      gas.value = convert(gas.value);
      gas.low = convert(gas.low);
      gas.high = convert(gas.high);
      gas.se = convert(gas.se);
      if (gas.detectionLimit !== undefined)
        gas.detectionLimit = { ...gas.detectionLimit, value: convert(gas.detectionLimit.value) };
      if (gas.determinationLimit !== undefined)
        gas.determinationLimit = { ...gas.determinationLimit, value: convert(gas.determinationLimit.value) };
      gas.unit = unit;
    }
    gas.columnAmount_ppm_m = toPpm(gas.value, gas.unit) * pathLength_m;
    const conversions: Conversion[] = [];
    let ppm = {
      value: toPpm(gas.value, gas.unit),
      low: toPpm(gas.low, gas.unit),
      high: toPpm(gas.high, gas.unit),
    };
    const apply = (f: (v: number) => number): typeof ppm => ({
      value: f(ppm.value),
      low: f(ppm.low),
      high: f(ppm.high),
    });
    const isWater = gas.gas === 'H2O';
    if (waterFraction !== undefined && !isWater) {
      const fraction = waterFraction;
      ppm = apply((v) => toDryBasis(v, fraction));
      conversions.push({
        kind: 'dry',
        ...ppm,
        unit: 'ppm',
        assumption: `dry basis: c_dry = c_wet / (1 − x_H2O), ${waterNote}`,
      });
    }
    if (options.oxygen !== undefined && !isWater) {
      const oxygen = options.oxygen;
      ppm = apply((v) => correctToReferenceOxygen(v, oxygen));
      const air = oxygen.air_pct ?? 20.9;
      conversions.push({
        kind: 'O2-corrected',
        ...ppm,
        unit: 'ppm',
        assumption:
          `corrected to ${oxygen.reference_pct} % O2: c × (${air} − ${oxygen.reference_pct}) / ` +
          `(${air} − ${oxygen.measured_pct}), O2 measured ${oxygen.measured_pct} %, O2 of air ${air} ` +
          `%${waterFraction !== undefined ? ', on the dry basis above' : ''}`,
      });
    }
    if (options.massConcentration !== undefined) {
      const species = findSpecies(gas.gas);
      if (species !== undefined) {
        const state = options.massConcentration;
        const mass = apply((v) => ppmToMgPerM3(v, species.molarMass_g_mol, state));
        conversions.push({
          kind: 'mg/m3',
          ...mass,
          unit: 'mg/m3',
          assumption:
            `mass concentration at ${state.temperature_K} K and ${state.pressure_kPa} kPa (ideal ` +
            `gas, M = ${species.molarMass_g_mol.toFixed(3)} ` +
            `g/mol)${conversions.length > 0 ? `, of the ${conversions.map((c) => c.kind).join(' and ')} value` : ''}`,
        });
      }
    }
    if (conversions.length > 0) gas.conversions = conversions;
    if (options.limits !== undefined && options.limits.length > 0) {
      const over = exceededLimits(gas.gas, toPpm(gas.high, gas.unit), options.limits);
      if (over.length > 0) {
        if (!gas.flags.includes('over-limit')) gas.flags.push('over-limit');
        gas.notes.push(...over.map((o) => o.message));
      }
    }
    return gas;
  });
}
