/**
 * Where each gas of a calibration stands: latest check, verdict, next due date, trend. Pure: the
 * calibration and its history records are read by the caller.
 */
import { reportedGases, type Calibration } from '../calibration/calibration.js';
import type { RecheckPolicy } from '../calibration/method.js';
import type { ConcentrationUnit } from '../gas/units.js';
import {
  evaluateHistory,
  type CusumSummary,
  type DriftEvaluation,
  type EvaluateOptions,
} from './evaluate.js';
import type { CheckRecord, Verdict } from './record.js';
import { scheduleFor, type Schedule } from './schedule.js';
import type { DriftTrend } from './trend.js';

/** The status of one gas of one calibration. */
export interface GasStatus {
  /** Calibration file as given. */
  file: string;
  /** The calibration's SHA-256. */
  calibrationSha256: string;
  /** The calibration's title, if any. */
  title?: string;
  /** Gas. */
  gas: string;
  /** The gas's calibration unit. */
  unit: ConcentrationUnit;
  /** Policy used (the calibration's, or an override). */
  policy: RecheckPolicy;
  /** Number of checks of this gas in the history. */
  checks: number;
  /** Latest check by time, as judged now. */
  lastCheck?: {
    time: string;
    verdict: Verdict;
    recoveryPct?: number;
    measured: number;
    certified: number;
    line?: number;
  };
  /** Schedule (state, next due, days overdue). */
  schedule: Schedule;
  /** Trend of recovery against time. */
  trend: DriftTrend;
  /** The CUSUM chart after the latest check. */
  cusum: CusumSummary;
  /** Notes from the evaluation (verdicts that changed under the policy used, …). */
  notes: string[];
  /** The full evaluation (for charts). */
  evaluation: DriftEvaluation;
}

/** Options of {@link calibrationStatus}. */
export interface StatusOptions extends Omit<EvaluateOptions, 'policy' | 'gas'> {
  /** Override of the calibration's interval and tolerance, field by field. */
  policy?: Partial<RecheckPolicy>;
  /** Time to judge at, ISO (default now). */
  now?: string;
  /** "Due" means due within this many days (default 1). */
  dueWithinDays?: number;
}

/**
 * The status of every gas of a calibration.
 *
 * @param calibration - the verified calibration
 * @param file - its file name, for the rows
 * @param records - its history records (empty when there is no history yet)
 * @param options - policy override, now, due-soon window (days), evaluation options
 * @returns one status per gas of the calibration, in the calibration's order
 * @throws BandwrightError `INVALID_VALUE` for a bad policy or time
 */
export function calibrationStatus(
  calibration: Calibration,
  file: string,
  records: readonly CheckRecord[],
  options: StatusOptions = {},
): GasStatus[] {
  const policy: RecheckPolicy = { ...calibration.method.recheck, ...options.policy };
  const { policy: _override, now, dueWithinDays, ...evaluateOptions } = options;
  return reportedGases(calibration).map((gas) => {
    const evaluation = evaluateHistory(records, { ...evaluateOptions, policy, gas: gas.gas });
    const schedule = scheduleFor(
      evaluation.checks.map((c) => ({ time: c.record.time, verdict: c.verdict })),
      {
        everyDays: policy.everyDays,
        calibrationCreatedAt: calibration.createdAt,
        ...(now === undefined ? {} : { now }),
        ...(dueWithinDays === undefined ? {} : { dueWithinDays }),
      },
    );
    const status: GasStatus = {
      file,
      calibrationSha256: calibration.sha256,
      gas: gas.gas,
      unit: gas.unit,
      policy,
      checks: evaluation.checks.length,
      schedule,
      trend: evaluation.trend,
      cusum: evaluation.cusum,
      notes: evaluation.notes,
      evaluation,
    };
    if (calibration.title !== undefined) status.title = calibration.title;
    const latest = evaluation.latest;
    if (latest !== undefined) {
      status.lastCheck = {
        time: latest.record.time,
        verdict: latest.verdict,
        measured: latest.record.measured,
        certified: latest.record.certified,
      };
      if (latest.recoveryPct !== undefined) status.lastCheck.recoveryPct = latest.recoveryPct;
      if (latest.record.line !== undefined) status.lastCheck.line = latest.record.line;
    }
    return status;
  });
}

/**
 * The exit status `status` gives for a set of gas states (DESIGN §4): 4 when any is overdue or
 * failed, 3 when any is due within the window, else 0.
 *
 * @param states - the schedule states
 */
export function statusExitCode(states: readonly Schedule['state'][]): 0 | 3 | 4 {
  if (states.some((s) => s === 'overdue' || s === 'failed')) return 4;
  if (states.includes('due')) return 3;
  return 0;
}

/**
 * The exit status `recheck` gives for a verdict (DESIGN §4): pass 0, warning 3, fail 4.
 *
 * @param verdict - the verdict
 */
export function recheckExitCode(verdict: Verdict): 0 | 3 | 4 {
  return verdict === 'fail' ? 4 : verdict === 'warning' ? 3 : 0;
}
