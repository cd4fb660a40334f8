/**
 * The shapes of the JSON the command-line program writes, built from the product's own types, so
 * that tests read its output with type checks; and narrowing of a batch entry to a result or a
 * failure, failing the test (and showing the entry) when it is the other.
 *
 * The documents are assembled in src/report (results.ts `resultsDocument`, drift-text.ts
 * `recheckDocument` and `statusDocument`) and src/cli (inspect, verify); each type here follows
 * the function named beside it.
 */
import { expect } from 'vitest';
import type { BatchEntry, ScanFailure } from '../../src/report/results.js';
import { isFailure } from '../../src/report/results.js';
import type { GasResult, ScanResult } from '../../src/calibration/result.js';
import type { ConcentrationUnit } from '../../src/gas/units.js';
import type { ControlLimits, EvaluatedCheck, SigmaChoice } from '../../src/drift/evaluate.js';
import type { Verdict } from '../../src/drift/record.js';
import type { RuleFiring } from '../../src/drift/rules.js';
import type { Schedule, ScheduleState } from '../../src/drift/schedule.js';
import type { GasStatus } from '../../src/drift/status.js';
import type { DriftTrend } from '../../src/drift/trend.js';
import type { StatusProblem } from '../../src/report/drift-text.js';
import type { ScanDescription } from '../../src/report/inspect.js';
import type { FileStamp } from '../../src/batch/watch-folder.js';

/** The tool that wrote a document. */
interface ToolStamp {
  name: string;
  version: string;
}

/** The `quantify --json` document (`resultsDocument`), also the demo's `*.results.json`. */
export interface QuantifyDocument {
  tool: ToolStamp;
  /** The calibration file and its SHA-256. */
  calibration: { file: string; sha256: string };
  /** Prediction-interval level. */
  level: number;
  /** Results and failures in input order. */
  results: BatchEntry[];
}

/** One line of `--jsonl` (quantify, watch): a results element with the calibration's hash. */
export type ResultLine = BatchEntry & { calibrationSha256: string };

/** The `recheck --json` document (`recheckDocument`); `null` stands for a value that is absent. */
export interface RecheckDocument {
  tool: ToolStamp;
  calibration: { file: string; sha256: string };
  gas: string;
  unit: ConcentrationUnit;
  measured: number;
  certified: number;
  recoveryPct: number | null;
  low: number | null;
  high: number | null;
  verdict: Verdict;
  rules: Pick<RuleFiring, 'rule' | 'severity' | 'reason'>[];
  nextDue: string | null;
  trend: DriftTrend;
  time: string;
  recordedAt: string;
  scan: { path: string; sha256: string };
  level: number;
  se: number;
  z: number | null;
  detectionLimit: number | null;
  kind: EvaluatedCheck['kind'];
  recoveryLowPct: number | null;
  recoveryHighPct: number | null;
  tolerancePct: number;
  everyDays: number;
  nearTolerance: boolean;
  sigma: SigmaChoice | null;
  limits: ControlLimits | null;
  reasons: string[];
  schedule: Schedule;
  history: { file: string; line: number | null; created: boolean; checks: number };
  notes: string[];
  cautions: string[];
}

/** One calibration gas in the `status --json` document. */
export interface StatusEntry {
  file: string;
  sha256: string;
  title: string | null;
  gas: string;
  unit: ConcentrationUnit;
  everyDays: number;
  tolerancePct: number;
  checks: number;
  lastCheck: NonNullable<GasStatus['lastCheck']> | null;
  state: ScheduleState;
  nextDue: string | null;
  daysUntilDue: number | null;
  daysOverdue: number;
  reason: string;
  trend: DriftTrend;
  notes: string[];
}

/** The `status --json` document (`statusDocument`). */
export interface StatusDocument {
  tool: ToolStamp;
  /** The time judged at, ISO. */
  now: string;
  exitStatus: number;
  calibrations: StatusEntry[];
  skipped: StatusProblem[];
  errors: StatusProblem[];
}

/** The `inspect --json` document (src/cli/inspect.ts). */
export interface InspectDocument {
  scans: ScanDescription[];
  failures: { scan: string; error: string }[];
}

/** One line of a watched folder's record of processed files (src/batch/watch-folder.ts). */
export type WatchStateLine = { name: string } & FileStamp;

/**
 * The entry as a scan result; the test fails, showing the entry, when it is a failure or missing.
 *
 * @param entry - a batch entry
 */
export function scanResult(entry: BatchEntry | undefined): ScanResult {
  if (entry === undefined || isFailure(entry))
    expect.fail(`expected a scan result, got ${JSON.stringify(entry)}`);
  return entry;
}

/**
 * The entry as a failure; the test fails, showing the entry, when it is a result or missing.
 *
 * @param entry - a batch entry
 */
export function scanFailure(entry: BatchEntry | undefined): ScanFailure {
  if (entry === undefined || !isFailure(entry))
    expect.fail(`expected a failed scan, got ${JSON.stringify(entry)}`);
  return entry;
}

/**
 * One gas of a scan result; the test fails when the entry is a failure or has no gas there.
 *
 * @param entry - a batch entry
 * @param index - position of the gas in the result (calibration order)
 */
export function gasAt(entry: BatchEntry | undefined, index = 0): GasResult {
  const gas = scanResult(entry).gases[index];
  if (gas === undefined) expect.fail(`expected a gas at position ${index}, got ${JSON.stringify(entry)}`);
  return gas;
}
