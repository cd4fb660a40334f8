/**
 * Measuring a check standard with a calibration: quantify the check scan, pick the gas, and put
 * the certified value in the gas's unit. Pure (the scan is already read).
 */
import { BandwrightError } from '../errors.js';
import { reportedGases, type Calibration } from '../calibration/calibration.js';
import { quantifyScan, type QuantifyOptions } from '../calibration/quantify.js';
import type { ScanResult } from '../calibration/result.js';
import { fromPpm, toPpm, type ConcentrationUnit } from '../gas/units.js';
import type { Spectrum } from '../spectrum/spectrum.js';
import { TOOL } from '../version.js';
import type { CheckMeasurementRecord } from './evaluate.js';
import { recoveryPercent, type CheckRecord } from './record.js';

/** Options of {@link measureCheck}. */
export interface MeasureCheckOptions {
  /** Certified concentration of the check standard, in `unit`, ≥ 0 (0 = zero gas). */
  certified: number;
  /** Unit of `certified` (default: the gas's calibration unit). */
  unit?: ConcentrationUnit;
  /** Gas to check; needed when the calibration has more than one. */
  gas?: string;
  /** Prediction-interval level (default 0.95). */
  level?: number;
  /** Conditions for a scan that does not carry them (path length m, temperature K, pressure kPa). */
  defaultConditions?: QuantifyOptions['defaultConditions'];
}

/**
 * A check standard as measured, before it is judged: the figures a history record keeps (every
 * concentration in the gas's calibration unit, the certified value converted to it), with the
 * flag notes and the full quantification result of the scan.
 */
export interface CheckMeasurement extends Pick<
  CheckRecord,
  'gas' | 'unit' | 'certified' | 'measured' | 'low' | 'high' | 'se' | 'detectionLimit' | 'recoveryPct' | 'z'
> {
  /** Flag notes of the quantification (extrapolated, saturated, conditions far …). */
  notes: string[];
  /** The full quantification result of the scan. */
  result: ScanResult;
}

/**
 * Quantifies a check scan and compares it with the certified value.
 *
 * @param calibration - a verified calibration that reads scans
 * @param spectrum - the check scan
 * @param options - certified value (≥ 0, in `unit`), unit, gas, level, default conditions
 * @returns the measurement
 * @throws BandwrightError `INVALID_VALUE` (negative or non-finite certified value; several gases
 *   and no `gas`; a gas the calibration does not have), and the errors of `quantifyScan`
 * @example
 * const measurement = measureCheck(calibration, readScan('checks/check-0901.jdx'), { certified: 100 });
 * measurement.recoveryPct; // e.g. 100.7
 */
export function measureCheck(
  calibration: Calibration,
  spectrum: Spectrum,
  options: MeasureCheckOptions,
): CheckMeasurement {
  const gases = reportedGases(calibration);
  const names = gases.map((g) => g.gas);
  const onlyGas = names.length === 1 ? names[0] : undefined;
  const gasName = options.gas ?? onlyGas;
  if (gasName === undefined)
    throw new BandwrightError(
      'INVALID_VALUE',
      (name) =>
        `the calibration has ${names.length} gases (${names.join(', ')}); ` +
        `choose the gas of the check standard with ${name('gas')}`,
      { parameter: 'gas' },
    );
  const gas = gases.find((g) => g.gas.toLowerCase() === gasName.toLowerCase());
  if (gas === undefined)
    throw new BandwrightError(
      'INVALID_VALUE',
      (name) => `${name('gas')} = ${JSON.stringify(gasName)}, the calibration has ${names.join(', ')}`,
      { parameter: 'gas' },
    );
  if (!Number.isFinite(options.certified) || options.certified < 0) {
    throw new BandwrightError(
      'INVALID_VALUE',
      (name) => `${name('certified')} = ${options.certified}, must be a concentration >= 0 (0 for zero gas)`,
      { parameter: 'certified' },
    );
  }
  const certified =
    options.unit === undefined || options.unit === gas.unit
      ? options.certified
      : fromPpm(toPpm(options.certified, options.unit), gas.unit);
  const result = quantifyScan(calibration, spectrum, {
    level: options.level ?? 0.95,
    ...(options.defaultConditions === undefined ? {} : { defaultConditions: options.defaultConditions }),
  });
  const found = result.gases.find((g) => g.gas === gas.gas);
  if (found === undefined)
    throw new BandwrightError(
      'INVALID_VALUE',
      `the calibration gave no result for ${gas.gas} in ${result.scan}`,
      { parameter: 'gas' },
    );
  const measurement: CheckMeasurement = {
    gas: gas.gas,
    unit: found.unit,
    certified,
    measured: found.value,
    low: found.low,
    high: found.high,
    se: found.se,
    notes: [...found.notes],
    result,
  };
  if (found.detectionLimit !== undefined) measurement.detectionLimit = found.detectionLimit.value;
  if (certified > 0) measurement.recoveryPct = recoveryPercent(found.value, certified);
  if (found.se > 0) measurement.z = (found.value - certified) / found.se;
  return measurement;
}

/**
 * The record of a measured check, ready to be judged ({@link judgeCheck} in `evaluate.ts`).
 *
 * @param measurement - from {@link measureCheck}
 * @param provenance - when it was measured and recorded (ISO), the scan path and its SHA-256
 * @returns the record without verdict, rules and σ
 */
export function checkRecordOf(
  measurement: CheckMeasurement,
  provenance: { time: string; recordedAt: string; scan: string; scanSha256: string },
): CheckMeasurementRecord {
  const record: CheckMeasurementRecord = {
    time: provenance.time,
    recordedAt: provenance.recordedAt,
    gas: measurement.gas,
    unit: measurement.unit,
    certified: measurement.certified,
    measured: measurement.measured,
    low: measurement.low,
    high: measurement.high,
    se: measurement.se,
    scan: provenance.scan,
    scanSha256: provenance.scanSha256,
    toolVersion: TOOL.version,
  };
  if (measurement.detectionLimit !== undefined) record.detectionLimit = measurement.detectionLimit;
  if (measurement.recoveryPct !== undefined) record.recoveryPct = measurement.recoveryPct;
  if (measurement.z !== undefined) record.z = measurement.z;
  return record;
}
