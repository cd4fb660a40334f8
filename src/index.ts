/**
 * bandwright's library root: the core job — read scans, build or load a calibration, quantify
 * samples with prediction intervals, recheck a calibration against a check standard. Everything a
 * function here takes or returns is exported here too.
 *
 * More lives under subpaths: `bandwright/models` (the fits themselves), `bandwright/drift` (control
 * rules, trend, schedule, status), `bandwright/report` (tables, results files, plots, HTML),
 * `bandwright/batch` (streaming batches and watched folders), `bandwright/simulate` (gas-cell
 * spectra). Deeper modules are internal and may change between releases.
 *
 * @example
 * import { readCalibration, readScan, quantifyScan } from 'bandwright';
 * const calibration = readCalibration('lab-co.calibration.json');
 * const result = quantifyScan(calibration, readScan('samples/cylinder-4471.jdx'), { level: 0.95 });
 * console.log(result.gases[0]); // { gas: 'CO', value: …, low: …, high: …, unit: 'ppm', flags: [] }
 */
export {
  BandwrightError,
  isBandwrightError,
  type ErrorCode,
  type ErrorLocation,
  type ParameterNames,
  type ParameterWording,
} from './errors.js';
export { TOOL } from './version.js';

// Scans
export { parseScan, type ParseScanOptions } from './formats/scan.js';
export { readScan, type ReadScanOptions } from './store/scan-file.js';
export type { Spectrum, YKind, ScanMetadata } from './spectrum/spectrum.js';

// Calibrations: from a manifest of standards and a method, or read back from a file
export { readManifest, type Manifest } from './store/manifest.js';
export { loadStandards, type LoadedStandards } from './store/standards.js';
export { readMethod, readCalibration, writeCalibration } from './store/calibration-file.js';
export { readResponseTable } from './store/tables.js';
export type { Method, BandMethod, ClsMethod, ResponseMethod } from './calibration/method.js';
export {
  buildBandCalibration,
  buildResponseCalibration,
  type StandardScan,
  type BuildContext,
  type ResponseRow,
} from './calibration/build.js';
export { buildClsCalibration } from './calibration/build-cls.js';
export { reportedGases, type Calibration, type CalibrationBody } from './calibration/calibration.js';

// Quantify
export { quantifyScan, quantifyResponses, type QuantifyOptions } from './calibration/quantify.js';
export type { ScanResult, GasResult, ResultFlag } from './calibration/result.js';

// Recheck: measure, judge against the history under its lock, append
export {
  measureCheck,
  checkRecordOf,
  type MeasureCheckOptions,
  type CheckMeasurement,
} from './drift/recheck.js';
export {
  judgeCheck,
  type JudgedCheck,
  type EvaluateOptions,
  type CheckMeasurementRecord,
} from './drift/evaluate.js';
export type { CheckRecord } from './drift/record.js';
export type { RecheckPolicy } from './calibration/method.js';
export {
  historyPathFor,
  readHistory,
  appendHistoryRecord,
  type AppendHistoryOptions,
  type AppendedRecord,
} from './store/history.js';
export type { History, ReadHistoryOptions } from './store/history-format.js';
