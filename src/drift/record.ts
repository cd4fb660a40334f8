/**
 * Check records: one measurement of a check standard with a calibration, as kept in the
 * calibration's history (DESIGN §3 "Drift", §4). Plain JSON-safe objects.
 *
 * Recovery % = measured / certified × 100. A check of zero gas (certified 0) has no recovery; it
 * is judged against the detection limit instead.
 */
import type { ConcentrationUnit } from '../gas/units.js';

/** The judgement of one check. */
export type Verdict = 'pass' | 'warning' | 'fail';

/** All verdicts, in increasing severity. */
export const VERDICTS: readonly Verdict[] = ['pass', 'warning', 'fail'];

/**
 * Control rules, in the order they are reported: the multirule set of Westgard, Barry, Hunt &
 * Groth (Clinical Chemistry 27 (1981) 493), then `CUSUM`, a signal of the tabular cumulative-sum
 * chart (ISO 7870-4) for slow, persistent drift.
 */
export type ControlRuleName = '1-2s' | '1-3s' | '2-2s' | 'R-4s' | '4-1s' | '10-x' | 'CUSUM';

/** All control rules. */
export const CONTROL_RULE_NAMES: readonly ControlRuleName[] = [
  '1-2s',
  '1-3s',
  '2-2s',
  'R-4s',
  '4-1s',
  '10-x',
  'CUSUM',
];

/** One recorded check, as a line of the history file holds it. */
export interface CheckRecord {
  /** When the check standard was measured, ISO 8601 UTC. */
  time: string;
  /** When the record was written, ISO 8601 UTC (differs from `time` for checks recorded later with `--at`). */
  recordedAt: string;
  /** Canonical gas name. */
  gas: string;
  /** Unit of `certified`, `measured`, `low`, `high`, `se` and `detectionLimit` (the gas's calibration unit). */
  unit: ConcentrationUnit;
  /** Certified concentration of the check standard (0 for zero gas). */
  certified: number;
  /** Concentration the calibration gives for the check scan. */
  measured: number;
  /** Lower end of the prediction interval of `measured` (−Infinity when unbounded). */
  low: number;
  /** Upper end of the prediction interval of `measured` (+Infinity when unbounded). */
  high: number;
  /** Standard error of `measured` (prediction uncertainty). */
  se: number;
  /** Detection limit of the calibration for this gas, when it has one. */
  detectionLimit?: number;
  /** Recovery %, measured / certified × 100; absent for zero gas. */
  recoveryPct?: number;
  /** (measured − certified) / se, the difference in units of the prediction uncertainty; absent when se is 0. */
  z?: number;
  /** Verdict given when the check was recorded. */
  verdict: Verdict;
  /** Control rules that fired when the check was recorded. */
  rules: ControlRuleName[];
  /** σ used for the control rules when recorded, % recovery; absent for zero gas. */
  sigmaPct?: number;
  /** Tolerance in force when recorded, ± % recovery. */
  tolerancePct: number;
  /** Scan path as the user gave it. */
  scan: string;
  /** SHA-256 of the scan file's bytes, hex. */
  scanSha256: string;
  /** Version of the tool that wrote the record. */
  toolVersion: string;
  /** 1-based line in the history file, when the record was read from one. */
  line?: number;
}

/** True for a zero-gas check (certified value 0), judged against the detection limit. */
export function isZeroCheck(record: Pick<CheckRecord, 'certified'>): boolean {
  return record.certified === 0;
}

/**
 * Recovery, %: measured / certified × 100.
 *
 * @param measured - measured concentration (any unit)
 * @param certified - certified concentration, same unit, > 0
 * @returns the recovery, or NaN when certified is not > 0 (a scalar kernel: callers check)
 * @example
 * recoveryPercent(97.5, 100); // 97.5
 */
export function recoveryPercent(measured: number, certified: number): number {
  if (!(certified > 0)) return Number.NaN;
  return (measured / certified) * 100;
}

/**
 * Deviation of a check from its certified value, % of the certified value:
 * (measured − certified) / certified × 100 (recovery − 100, computed without the cancellation).
 *
 * @param measured - measured concentration
 * @param certified - certified concentration, same unit, > 0
 * @returns the deviation, or NaN when certified is not > 0
 */
export function deviationPercent(measured: number, certified: number): number {
  if (!(certified > 0)) return Number.NaN;
  return ((measured - certified) / certified) * 100;
}
