/**
 * Evaluating a calibration's check history (DESIGN §3 "Drift"): the checks of one gas judged in
 * time order (`judge.ts`), the σ and limits for the next check (`sigma.ts`), the CUSUM chart
 * (`cusum.ts`), the trend (`trend.ts`), and notes on checks judged differently from when they were
 * recorded (`revisions.ts`). Pure.
 */
import { BandwrightError } from '../errors.js';
import type { RecheckPolicy } from '../calibration/method.js';
import type { CusumDirection, CusumSettings } from './cusum.js';
import {
  checkLabel,
  controlLimits,
  judgeSeries,
  sigmaForNext,
  type Baseline,
  type ControlLimits,
  type EvaluatedCheck,
} from './judge.js';
import type { CheckRecord, Verdict } from './record.js';
import { revisionNotes, verdictRevisions, type VerdictRevision } from './revisions.js';
import { sigmaFloor, type SigmaChoice } from './sigma.js';
import { fitDriftTrend, type DriftTrend } from './trend.js';

export { controlLimits, type Baseline, type ControlLimits, type EvaluatedCheck } from './judge.js';
export type { SigmaChoice, SigmaSource } from './sigma.js';
export type { VerdictRevision, RevisionCause } from './revisions.js';

/** Default number of checks within tolerance that make the baseline (DESIGN §3). */
export const DEFAULT_BASELINE_CHECKS = 8;
/** Default number of latest checks the trend is fitted to. */
export const DEFAULT_TREND_CHECKS = 10;
/** Default fewest checks for a trend. */
export const DEFAULT_MINIMUM_TREND_CHECKS = 4;

/** Options of {@link evaluateHistory}. */
export interface EvaluateOptions {
  /** Recheck interval, tolerance, σ floor and CUSUM settings (the calibration's `method.recheck`, or an override). */
  policy: RecheckPolicy;
  /** Gas to evaluate; needed when the records hold more than one gas. */
  gas?: string;
  /** Checks within tolerance that form the baseline (default 8). */
  baselineChecks?: number;
  /** Latest checks the trend uses (default 10). */
  trendChecks?: number;
  /** Fewest checks for a trend (default 4). */
  minimumTrendChecks?: number;
  /** Confidence level of the trend test and projection (default 0.95). */
  level?: number;
}

/** Where the CUSUM chart stands after the latest check, σ units. */
export interface CusumSummary extends CusumSettings {
  /** C⁺ after the latest span check (0 when there is none, or after a failed check). */
  upper: number;
  /** C⁻ after the latest span check. */
  lower: number;
  /** The latest span check signals: the direction of the drift, else null. */
  signal: CusumDirection | null;
  /** Time of the first check of the rise that signals, ISO, when it signals. */
  since: string | null;
  /** The sums restarted at zero after the latest span check because it failed. */
  restarted: boolean;
  /** Plain words: where the chart stands. */
  summary: string;
}

/** The evaluation of one gas's history. */
export interface DriftEvaluation {
  /** Gas evaluated. */
  gas: string;
  /** Policy used. */
  policy: RecheckPolicy;
  /** Every check of the gas in time order (equal times keep the order of the file). */
  checks: EvaluatedCheck[];
  /** Positions (in `checks`) of the span checks, the series of the control chart and the trend. */
  spanChecks: number[];
  /** The baseline. */
  baseline: Baseline;
  /** σ for the next check (what the chart's current limits use). */
  sigma: SigmaChoice;
  /** Control limits for the next check. */
  limits: ControlLimits;
  /** The CUSUM chart after the latest check. */
  cusum: CusumSummary;
  /** Trend of recovery against time over the latest span checks. */
  trend: DriftTrend;
  /** The latest check by time, if any. */
  latest?: EvaluatedCheck;
  /** Checks whose verdict now differs from the one recorded, with the cause. */
  revisions: VerdictRevision[];
  /** Notes: verdicts that differ from those recorded (one per check, or per group), and the like. */
  notes: string[];
}

/** Sorts records by time, keeping file order for equal times, and rejects bad times. */
function timeOrder(records: readonly CheckRecord[]): CheckRecord[] {
  const keyed = records.map((record, i) => {
    const ms = Date.parse(record.time);
    if (!Number.isFinite(ms)) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `check ${record.line === undefined ? i + 1 : `on line ${record.line}`}: ` +
          `time = ${JSON.stringify(record.time)}, must be an ISO 8601 time`,
        { parameter: 'time' },
      );
    }
    return { record, ms, i };
  });
  return keyed.sort((a, b) => a.ms - b.ms || a.i - b.i).map((k) => k.record);
}

/**
 * Which gas to evaluate: the one asked for, or the only one in the records.
 *
 * @throws BandwrightError `INVALID_VALUE` when several gases are present and none is named
 */
function chooseGas(records: readonly CheckRecord[], gas: string | undefined): string {
  if (gas !== undefined) return gas;
  const gases = [...new Set(records.map((r) => r.gas))];
  if (gases.length > 1)
    throw new BandwrightError(
      'INVALID_VALUE',
      (name) => `the history holds checks of ${gases.join(', ')}; name the gas to evaluate (${name('gas')})`,
      { parameter: 'gas' },
    );
  return gases[0] ?? '';
}

/** @throws BandwrightError `INVALID_VALUE` for a tolerance, floor or CUSUM setting out of range */
function checkPolicy(policy: RecheckPolicy): void {
  const fail = (parameter: string, text: string): never => {
    throw new BandwrightError('INVALID_VALUE', text, { parameter });
  };
  if (!(policy.tolerancePct > 0 && policy.tolerancePct < 100))
    fail('tolerancePct', `tolerance = ${policy.tolerancePct} %, must be a percentage > 0 and < 100`);
  const floor = policy.sigmaFloorPct;
  if (floor !== undefined && !(floor > 0 && floor < policy.tolerancePct))
    fail('sigmaFloorPct', `σ floor = ${floor} %, must be a percentage > 0 and below the tolerance`);
  const k = policy.cusum?.k;
  if (k !== undefined && !(k >= 0 && Number.isFinite(k)))
    fail('cusum.k', `CUSUM reference value k = ${k}σ, must be a number of σ >= 0`);
  const h = policy.cusum?.h;
  if (h !== undefined && !(h > 0 && Number.isFinite(h)))
    fail('cusum.h', `CUSUM decision interval h = ${h}σ, must be a number of σ > 0`);
}

function cusumSummary(
  checks: readonly EvaluatedCheck[],
  spanChecks: readonly number[],
  settings: CusumSettings,
): CusumSummary {
  const latestPosition = spanChecks[spanChecks.length - 1];
  const latest = latestPosition === undefined ? undefined : checks[latestPosition];
  const point = latest?.cusum;
  const scheme = `k = ${settings.k}σ, h = ${settings.h}σ`;
  if (latest === undefined || point === undefined)
    return {
      ...settings,
      upper: 0,
      lower: 0,
      signal: null,
      since: null,
      restarted: false,
      summary: `CUSUM (${scheme}): no span checks yet`,
    };
  const restarted = latest.verdict === 'fail';
  const sinceIndex =
    point.signal === 'below' ? point.lowerSince : point.signal === 'above' ? point.upperSince : undefined;
  const sinceCheck = sinceIndex === undefined ? undefined : checks[spanChecks[sinceIndex] as number];
  const since = sinceCheck?.record.time ?? null;
  const sums = `C⁺ = ${point.upper.toFixed(2)}σ, C⁻ = ${point.lower.toFixed(2)}σ`;
  const after = restarted ? '; the latest check failed, so the sums restart at zero with the next check' : '';
  const summary =
    point.signal === null
      ? `CUSUM (${scheme}): ${sums}, no signal${after}`
      : `CUSUM (${scheme}): ${sums}: signal, drifting ${point.signal === 'below' ? 'low' : 'high'}` +
        `${sinceCheck === undefined ? '' : ` since ${checkLabel(sinceCheck.record)}`} ` +
        `(${settings.onSignal === 'fail' ? "a fail, as the method's recheck policy sets" : 'a warning'})${after}`;
  return {
    ...settings,
    upper: point.upper,
    lower: point.lower,
    signal: point.signal,
    since,
    restarted,
    summary,
  };
}

/**
 * Evaluates a gas's check history: per-check rules and verdicts, σ and limits, baseline, CUSUM,
 * trend, and the checks judged differently from when they were recorded.
 *
 * @param records - check records (any order; those of other gases are ignored); not modified
 * @param options - policy (tolerance ± %, interval days, σ floor %, CUSUM k and h in σ), gas,
 *   baseline and trend sizes, level
 * @returns the evaluation
 * @throws BandwrightError `INVALID_VALUE` for a record without a valid time, for several gases
 *   without `gas`, or for a policy out of range (tolerance not > 0 and < 100, a floor not below it,
 *   k < 0, h ≤ 0)
 * @example
 * const evaluation = evaluateHistory(readHistory(path).records, { policy: calibration.method.recheck, gas: 'CO' });
 * evaluation.latest?.verdict; // 'pass' | 'warning' | 'fail'
 */
export function evaluateHistory(records: readonly CheckRecord[], options: EvaluateOptions): DriftEvaluation {
  const policy = options.policy;
  checkPolicy(policy);
  const size = Math.max(2, Math.round(options.baselineChecks ?? DEFAULT_BASELINE_CHECKS));
  const gas = chooseGas(records, options.gas);
  const ordered = timeOrder(records.filter((r) => r.gas === gas));
  const tolerance = policy.tolerancePct;
  const series = judgeSeries(ordered, policy, size);
  const { checks, spanChecks, baseline } = series;
  const sigma = sigmaForNext(policy, series);
  const revisions = verdictRevisions(ordered, series, policy, size);
  const trend = fitDriftTrend(
    spanChecks.map((i) => ({
      time: (checks[i] as EvaluatedCheck).record.time,
      recoveryPct: (checks[i] as EvaluatedCheck).recoveryPct as number,
    })),
    {
      tolerancePct: tolerance,
      maxPoints: options.trendChecks ?? DEFAULT_TREND_CHECKS,
      minimumPoints: options.minimumTrendChecks ?? DEFAULT_MINIMUM_TREND_CHECKS,
      // Checks cannot scatter less than one resolves, nor than the floor: as for σ.
      scatterFloorPct: Math.max(series.latestSePct ?? 0, sigmaFloor(policy).valuePct),
      ...(options.level === undefined ? {} : { level: options.level }),
    },
  );
  const evaluation: DriftEvaluation = {
    gas,
    policy,
    checks,
    spanChecks,
    baseline,
    sigma,
    limits: controlLimits(sigma.valuePct, tolerance),
    cusum: cusumSummary(checks, spanChecks, series.cusumSettings),
    trend,
    revisions,
    notes: revisionNotes(revisions, checks, tolerance),
  };
  const latest = checks[checks.length - 1];
  if (latest !== undefined) evaluation.latest = latest;
  return evaluation;
}

/** A new check before it is judged: everything but the verdict, rules and σ. */
export type CheckMeasurementRecord = Omit<
  CheckRecord,
  'verdict' | 'rules' | 'sigmaPct' | 'tolerancePct' | 'line'
>;

/** An earlier check whose verdict the new check changes (it was recorded for an earlier time). */
export interface VerdictChange {
  /** The earlier check. */
  check: EvaluatedCheck;
  /** Its verdict before the new check was added. */
  before: Verdict;
  /** Its verdict with the new check. */
  after: Verdict;
  /** Plain words. */
  note: string;
}

/** A new check judged against its history. */
export interface JudgedCheck {
  /** The complete record to append. */
  record: CheckRecord;
  /** The evaluation of the gas's history including the new check. */
  evaluation: DriftEvaluation;
  /** The new check within the evaluation. */
  check: EvaluatedCheck;
  /** Earlier checks whose verdict the new check changes (only when it is recorded for an earlier time). */
  changed: VerdictChange[];
}

/**
 * Judges a new check against the existing history and completes its record. The new check is
 * judged in time order; when it is recorded for a time before checks already in the history, the
 * checks after it are judged again with it, and those whose verdict changes are returned in
 * `changed` (so the recheck that causes a change reports it, once).
 *
 * @param history - records already in the history (any gases); not modified
 * @param measurement - the new check without verdict (time, gas, values, scan, tool)
 * @param options - the policy and the evaluation options of {@link evaluateHistory} (the gas is the new check's)
 * @returns the record to append, the evaluation with it, its evaluated check, and the verdicts it changes
 * @throws BandwrightError as {@link evaluateHistory}
 */
export function judgeCheck(
  history: readonly CheckRecord[],
  measurement: CheckMeasurementRecord,
  options: EvaluateOptions,
): JudgedCheck {
  const provisional: CheckRecord = {
    ...measurement,
    verdict: 'pass',
    rules: [],
    tolerancePct: options.policy.tolerancePct,
  };
  const gasOptions = { ...options, gas: measurement.gas };
  const evaluation = evaluateHistory([...history, provisional], gasOptions);
  const check = evaluation.checks.find((c) => c.record === provisional) as EvaluatedCheck;
  const record: CheckRecord = {
    ...provisional,
    verdict: check.verdict,
    rules: check.rules.map((r) => r.rule),
    ...(check.sigma === undefined ? {} : { sigmaPct: check.sigma.valuePct }),
  };
  check.record = record;
  const changed: VerdictChange[] = [];
  const later = evaluation.checks.slice(check.index + 1);
  if (later.length > 0) {
    const without = evaluateHistory(history, gasOptions);
    const before = new Map(without.checks.map((c) => [c.record, c.verdict]));
    for (const c of later) {
      const previous = before.get(c.record);
      if (previous === undefined || previous === c.verdict) continue;
      changed.push({
        check: c,
        before: previous,
        after: c.verdict,
        note:
          `this check is recorded for ${record.time.slice(0, 10)}, before ${checkLabel(c.record)}` +
          `${c.record.line === undefined ? '' : ` (history line ${c.record.line})`}, which is judged again ` +
          `in time order with it: its verdict changes from ${previous} to ${c.verdict}` +
          `${c.rules.length > 0 ? ` (${c.rules.map((r) => r.rule).join(', ')})` : ''}`,
      });
    }
  }
  // The revisions were worked out with the provisional record; the new check is now complete.
  evaluation.revisions = evaluation.revisions.filter((r) => r.index !== check.index);
  evaluation.notes = revisionNotes(evaluation.revisions, evaluation.checks, options.policy.tolerancePct);
  return { record, evaluation, check, changed };
}
