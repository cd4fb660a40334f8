/**
 * `bandwright/calibration`: the calibration record beyond the root's load-and-use — method
 * parsing, sealing and verifying the record and its inputs, the per-model quantify steps, result
 * decoration (units, dry basis, O2 reference, limits), manifests and tables, hashes and atomic
 * writes, and the input limits.
 */
export {
  parseMethod,
  parseResponseMethod,
  DEFAULT_RECHECK,
  type BandGasMethod,
  type ClsGasMethod,
  type ResponseGasMethod,
  type ResponseKind,
} from '../calibration/method.js';
export {
  SCHEMA_VERSION,
  calibrationHash,
  sealCalibration,
  verifyCalibration,
  canonicalJson,
  type CalibrationInput,
  type GasCalibration,
  type ClsCalibration,
  type CalibrationStandard,
  type ZeroGasLimit,
} from '../calibration/calibration.js';
export { channelsFromScan, onChannels, type ChannelGrid } from '../calibration/build-cls.js';
export { quantifyBandScan, quantifyClsScan } from '../calibration/quantify.js';
export {
  decorateGases,
  readWarnings,
  type ReportingOptions,
  type Conversion,
  type ResultWarning,
  type ResultWarningCode,
  type QuantifyWarningCode,
} from '../calibration/result.js';
export { parseManifest, type ManifestEntry, type CertifiedValue } from '../store/manifest.js';
export { readLimits } from '../store/tables.js';
export {
  verifyInputs,
  checkInputs,
  recordedInputPath,
  type IntegrityReport,
  type RecordedInputCheck,
  type RecordedInputStatus,
} from '../store/verify.js';
export { sha256OfBytes, sha256OfFile } from '../store/hash.js';
export { writeFileAtomic, type AtomicWriteOptions } from '../store/atomic-write.js';
export { resourceLimits, RESOURCE_LIMIT_SETTINGS, type ResourceLimits } from '../resource-limits.js';
