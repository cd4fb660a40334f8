/**
 * The public library API of bandwright: everything the command-line program itself uses.
 * Scripts may drive the same functions (read files through the `io` functions, compute with the
 * pure core, format with the `report` functions).
 */
export { BandwrightError, isBandwrightError, type ErrorCode, type ErrorLocation } from './errors.js';
export { TOOL } from './version.js';

// Spectra
export {
  makeSpectrum,
  toAbsorbance,
  toTransmittance,
  resample,
  interpolateAt,
  Y_KINDS,
  type Spectrum,
  type YKind,
  type ScanMetadata,
} from './spectrum/spectrum.js';

// Band features
export {
  measureBand,
  fitBaseline,
  evaluateBaseline,
  type BandFeatures,
  type BaselineSpec,
  type FittedBaseline,
} from './bands/band.js';
export { assertBandWindows, formatWindow, type Window } from './bands/windows.js';

// Gases, conditions, units, safety
export {
  SPECIES,
  findSpecies,
  requireInfraredSpecies,
  normalModeCount,
  needsCaution,
  type Species,
} from './gas/species.js';
export {
  resolveConditions,
  densityPathFactor,
  conditionsFarReasons,
  medianConditions,
  type CellConditions,
  type PartialConditions,
} from './gas/conditions.js';
export {
  ppmToMgPerM3,
  toDryBasis,
  correctToReferenceOxygen,
  toPpm,
  fromPpm,
  unitLabel,
  molarVolume_L,
  parseConcentrationUnit,
  NORMAL_STATE,
  GAS_CONSTANT,
  type ConcentrationUnit,
  type ReferenceState,
} from './gas/units.js';
export {
  GENERAL_CAUTION,
  cautionFor,
  cautionsFor,
  exceededLimits,
  type ExposureLimit,
} from './gas/safety.js';

// Statistics and models
export { leastSquares, solveLeastSquaresMany, type LeastSquaresFit } from './stats/least-squares.js';
export { tQuantile, fQuantile, tCdf, fCdf } from './stats/distributions.js';
export { fitUnivariate } from './models/univariate/fit.js';
export { predictUnivariate } from './models/univariate/predict.js';
export { responseBand } from './models/univariate/response-band.js';
export type { CurveForm, UnivariateModel, WeightScheme } from './models/univariate/model.js';
export { fitCls, predictCls, type ClsModel } from './models/cls/spectral.js';
export type { ClsPrediction } from './models/cls/model.js';
export { fitBandCls, predictBandCls, type BandClsModel } from './models/cls/band.js';

// Calibrations
export {
  parseMethod,
  parseResponseMethod,
  DEFAULT_RECHECK,
  type Method,
  type BandMethod,
  type ResponseMethod,
  type ClsMethod,
} from './calibration/method.js';
export {
  SCHEMA_VERSION,
  reportedGases,
  calibrationHash,
  sealCalibration,
  verifyCalibration,
  canonicalJson,
  type Calibration,
  type CalibrationInput,
  type GasCalibration,
  type ClsCalibration,
} from './calibration/calibration.js';
export { buildClsCalibration, channelsFromScan, onChannels } from './calibration/build-cls.js';
export {
  buildBandCalibration,
  buildResponseCalibration,
  type StandardScan,
  type BuildContext,
  type ResponseRow,
} from './calibration/build.js';
export {
  quantifyScan,
  quantifyBandScan,
  quantifyClsScan,
  quantifyResponses,
  type QuantifyOptions,
} from './calibration/quantify.js';
export {
  decorateGases,
  type GasResult,
  type ScanResult,
  type ResultFlag,
  type ReportingOptions,
  type Conversion,
} from './calibration/result.js';

// Files
export { parseScan } from './formats/scan.js';
export { readScan } from './store/scan-file.js';
export { expandScanArguments } from './batch/scan-paths.js';
export { sha256OfBytes, sha256OfFile } from './store/hash.js';
export { readManifest, parseManifest, type Manifest, type ManifestEntry } from './store/manifest.js';
export { loadStandards } from './store/standards.js';
export { readCalibration, writeCalibration, readMethod } from './store/calibration-file.js';
export { readResponseTable, readLimits } from './store/tables.js';
export { writeFileAtomic } from './store/atomic-write.js';
export { isNonEmptyFolder } from './store/folders.js';
export { formatCsv, guardCell } from './formats/csv-table.js';
export { formatJcamp } from './formats/jcamp/write.js';
export { formatSpectrumCsv } from './formats/spectrum-csv-write.js';

// Integrity
export {
  verifyInputs,
  checkInputs,
  recordedInputPath,
  type IntegrityReport,
  type RecordedInputCheck,
  type RecordedInputStatus,
} from './store/verify.js';
export {
  resourceLimits,
  resourceLimitsHelp,
  RESOURCE_LIMIT_SETTINGS,
  type ResourceLimits,
} from './resource-limits.js';

// Simulation
export { simulateSpectrum, type SimulationOptions, type SimulationResult } from './simulate/index.js';

// Drift
export type { RecheckPolicy } from './calibration/method.js';
export {
  recoveryPercent,
  deviationPercent,
  isZeroCheck,
  VERDICTS,
  CONTROL_RULE_NAMES,
  type CheckRecord,
  type Verdict,
  type ControlRuleName,
} from './drift/record.js';
export { controlRulesAt, CONTROL_RULES, type RuleFiring, type RuleSeverity } from './drift/rules.js';
export {
  fitDriftTrend,
  trendAt,
  DAY_MS,
  type DriftTrend,
  type TrendPoint,
  type TrendOptions,
  type TrendProjection,
} from './drift/trend.js';
export {
  evaluateHistory,
  judgeCheck,
  controlLimits,
  DEFAULT_BASELINE_CHECKS,
  DEFAULT_TREND_CHECKS,
  DEFAULT_MINIMUM_TREND_CHECKS,
  type DriftEvaluation,
  type EvaluatedCheck,
  type EvaluateOptions,
  type SigmaChoice,
  type Baseline,
  type ControlLimits,
  type CheckMeasurementRecord,
  type JudgedCheck,
} from './drift/evaluate.js';
export { scheduleFor, type Schedule, type ScheduleState, type ScheduleOptions } from './drift/schedule.js';
export {
  measureCheck,
  checkRecordOf,
  type CheckMeasurement,
  type MeasureCheckOptions,
} from './drift/recheck.js';
export {
  calibrationStatus,
  statusExitCode,
  recheckExitCode,
  type GasStatus,
  type StatusOptions,
} from './drift/status.js';
export {
  historyPathFor,
  readHistory,
  readHistoryIfExists,
  appendHistoryRecord,
  moveHistoryAside,
  type AppendHistoryOptions,
  type AppendedRecord,
} from './store/history.js';
export {
  parseHistory,
  formatHistoryHeader,
  formatHistoryRecord,
  HISTORY_COLUMNS,
  HISTORY_FORMAT_VERSION,
  type History,
  type ReadHistoryOptions,
} from './store/history-format.js';
export {
  findCalibrationFiles,
  collectCalibrationFiles,
  type SkippedFile,
  type CollectedCalibrations,
} from './store/calibration-files.js';
export { readCheckList, type CheckListEntry } from './store/check-list.js';
export { withFileLock, type LockOptions } from './store/lock.js';
export {
  formatRecheckText,
  recheckDocument,
  formatStatusText,
  statusDocument,
  trendCell,
  type RecheckOutcome,
  type StatusReport,
  type StatusProblem,
} from './report/drift-text.js';

// Reports
export {
  formatResultsText,
  resultsDocument,
  resultsCsv,
  resultColumns,
  resultRow,
  isFailure,
  type BatchEntry,
  type ScanFailure,
} from './report/results.js';
export { formatTextTable, formatNumber } from './report/table.js';

// Plots and report
export { escapeText, slug } from './report/svg/markup.js';
export { SERIES_COLOURS, seriesStyle, type SeriesStyle } from './report/svg/palette.js';
export { svgFile } from './report/svg/chart.js';
export {
  calibrationCurveData,
  renderCalibrationCurve,
  type CalibrationCurvePlotInput,
  type CalibrationCurveOptions,
  type CurveStandardPoint,
  type CurveBandPoint,
  type CurveLimitLine,
} from './report/svg/calibration-curve.js';
export {
  renderSpectra,
  gasSpectraData,
  thinForDrawing,
  concentrationGroup,
  type SpectraPlotInput,
  type SpectraOptions,
  type SpectrumSeries,
  type BaselineSeries,
  type LabelledSpectrum,
  type WavenumberAxis,
} from './report/svg/spectra.js';
export {
  renderClsFit,
  type ClsFitPlotInput,
  type ClsFitOptions,
  type ClsContribution,
} from './report/svg/cls-fit.js';
export {
  renderControlChart,
  type ControlChartInput,
  type ControlChartOptions,
  type ControlChartRecord,
  type ControlChartTrend,
  type CheckVerdict,
} from './report/svg/control-chart.js';
export { controlChartFromEvaluation } from './report/svg/control-chart-data.js';
export { clsFitData } from './report/svg/cls-data.js';
export {
  calibrationPlots,
  samplePlots,
  controlChartPlot,
  uniqueFileNames,
  type NamedPlot,
  type PlotSetOptions,
  type StandardSpectrum,
} from './report/svg/plot-set.js';
export {
  calibrationReportHtml,
  calibrationReportPlots,
  type CalibrationReportInput,
  type CalibrationReportOptions,
  type InputCheck,
  type InputFileStatus,
  type RecheckHistoryView,
  type RecheckRow,
} from './report/html.js';
export {
  quantifyReportHtml,
  quantifyReportPlots,
  type QuantifyReportInput,
  type QuantifyReportOptions,
  type SampleSpectrum,
} from './report/html-quantify.js';

// Batch and watch
export {
  openResultsWriter,
  partialResultsPath,
  assertAppendable,
  type ResultsWriter,
  type ResultsWriterOptions,
} from './batch/results-writer.js';
export { createScanReader, type ScanReader, type ScanReaderOptions } from './batch/scan-reader.js';
export { readScanList, parseScanList, MAX_SCAN_LIST_BYTES } from './batch/scan-list.js';
export {
  createFolderWatcher,
  readProcessedRecord,
  openProcessedRecord,
  type FolderWatcher,
  type FolderWatcherOptions,
  type FileStamp,
  type ReadyFile,
  type ProcessedRecordFile,
} from './batch/watch-folder.js';
