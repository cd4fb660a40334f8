/**
 * `bandwright/drift`: judging check standards over time — control rules, σ and what sets it, the
 * CUSUM chart, the drift trend and its projected crossing, the recheck schedule and the status of calibrations —
 * with the history file's format, finding calibrations in folders, and the recheck and status
 * documents and text.
 */
export {
  recoveryPercent,
  deviationPercent,
  isZeroCheck,
  VERDICTS,
  CONTROL_RULE_NAMES,
  type Verdict,
  type ControlRuleName,
} from '../drift/record.js';
export {
  controlRulesAt,
  formatSigmaMultiple,
  CONTROL_RULES,
  type RuleFiring,
  type RuleSeverity,
} from '../drift/rules.js';
export {
  chooseSigma,
  checkStandardErrorPct,
  sigmaFloor,
  DEFAULT_SIGMA_FLOOR_DIVISOR,
  SHORT_HISTORY_FLOOR_DIVISOR,
  type SigmaSource,
  type BaselineState,
} from '../drift/sigma.js';
export {
  tabularCusum,
  cusumStep,
  cusumSettings,
  CUSUM_START,
  DEFAULT_CUSUM_K,
  DEFAULT_CUSUM_H,
  DEFAULT_CUSUM_SIGNAL,
  type CusumPoint,
  type CusumSettings,
  type CusumDirection,
} from '../drift/cusum.js';
export {
  fitDriftTrend,
  trendAt,
  DAY_MS,
  type DriftTrend,
  type TrendPoint,
  type TrendOptions,
  type TrendProjection,
} from '../drift/trend.js';
export {
  evaluateHistory,
  controlLimits,
  DEFAULT_BASELINE_CHECKS,
  DEFAULT_TREND_CHECKS,
  DEFAULT_MINIMUM_TREND_CHECKS,
  type DriftEvaluation,
  type EvaluatedCheck,
  type SigmaChoice,
  type Baseline,
  type ControlLimits,
  type CusumSummary,
  type VerdictRevision,
  type RevisionCause,
  type VerdictChange,
} from '../drift/evaluate.js';
export { scheduleFor, type Schedule, type ScheduleState, type ScheduleOptions } from '../drift/schedule.js';
export {
  calibrationStatus,
  statusExitCode,
  recheckExitCode,
  type GasStatus,
  type StatusOptions,
} from '../drift/status.js';
export { readHistoryIfExists, moveHistoryAside } from '../store/history.js';
export {
  parseHistory,
  formatHistoryHeader,
  formatHistoryRecord,
  HISTORY_COLUMNS,
  HISTORY_FORMAT_VERSION,
} from '../store/history-format.js';
export {
  findCalibrationFiles,
  collectCalibrationFiles,
  type SkippedFile,
  type CollectedCalibrations,
} from '../store/calibration-files.js';
export { readCheckList, type CheckListEntry } from '../store/check-list.js';
export {
  formatRecheckText,
  recheckDocument,
  formatStatusText,
  statusDocument,
  type RecheckOutcome,
  type StatusReport,
  type StatusProblem,
  type RecheckDocument,
  type StatusDocument,
  type StatusEntry,
  type CusumEntry,
} from '../report/drift-text.js';
export type { CusumPolicy, CusumSignal } from '../calibration/method.js';
export type { LockOptions } from '../store/lock.js';
