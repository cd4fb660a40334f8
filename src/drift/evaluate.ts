/**
 * Judging checks against the tolerance and the control rules, over a calibration's history
 * (DESIGN §3 "Drift"). Pure.
 *
 * For each check of a gas, in time order:
 * - zero gas (certified 0): pass when |measured| is below the calibration's detection limit
 *   (when the calibration has none: when the prediction interval contains 0), else fail;
 * - otherwise fail when the recovery is outside 100 ± tolerance; within it, fail when a reject
 *   rule fires (out of statistical control), warning when 1-2s fires or the prediction interval
 *   of the measured value reaches beyond the tolerance (the check cannot tell pass from fail),
 *   else pass.
 *
 * σ of the control rules (Shewhart phase I / phase II): tolerance/3 (so that the ±3σ action limit
 * is the tolerance) until a baseline of 8 checks within the tolerance exists; from the check after
 * the baseline on, the sample SD of those 8 recoveries, frozen, so that later drift cannot widen the
 * limits. The chart's centre is always 100 % (the certified value). When a rule looks back over
 * earlier checks it expresses them in the σ in force at the check being judged.
 */
import { BandwrightError } from '../errors.js';
import type { RecheckPolicy } from '../calibration/method.js';
import { deviationPercent, isZeroCheck, recoveryPercent, type CheckRecord, type Verdict } from './record.js';
import { controlRulesAt, type RuleFiring } from './rules.js';
import { fitDriftTrend, type DriftTrend } from './trend.js';

/** Default number of checks within tolerance that make the baseline (DESIGN §3). */
export const DEFAULT_BASELINE_CHECKS = 8;
/** Default number of latest checks the trend is fitted to. */
export const DEFAULT_TREND_CHECKS = 10;
/** Default fewest checks for a trend. */
export const DEFAULT_MINIMUM_TREND_CHECKS = 4;

/** Options of {@link evaluateHistory}. */
export interface EvaluateOptions {
  /** Recheck interval and tolerance (the calibration's `method.recheck`, or an override). */
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

/** The σ the control rules use at one check, and why. */
export interface SigmaChoice {
  /** σ, % recovery. */
  valuePct: number;
  /** `tolerance` (tolerance/3, before the baseline exists) or `baseline` (frozen baseline SD). */
  basis: 'tolerance' | 'baseline';
  /** Plain words: which σ and why. */
  reason: string;
}

/** The baseline of checks that fixes σ once it exists. */
export interface Baseline {
  /** Number of checks it needs. */
  size: number;
  /** Positions (in `DriftEvaluation.checks`) of the checks in it so far, oldest first. */
  checks: number[];
  /** Whether it is complete (σ is then frozen to its SD for all later checks). */
  complete: boolean;
  /** Mean recovery of the baseline checks, %, when complete. */
  meanPct?: number;
  /** Sample SD (n − 1) of the baseline recoveries, %, when complete. */
  sdPct?: number;
  /** Times of its first and last check, ISO. */
  from?: string;
  to?: string;
}

/** Limits of the control chart around 100 %, in % recovery. */
export interface ControlLimits {
  /** Centre line, % (the certified value, 100 %). */
  centrePct: number;
  /** σ, %. */
  sigmaPct: number;
  /** ±1σ. */
  oneSigma: [number, number];
  /** ±2σ, the warning limits. */
  warning: [number, number];
  /** ±3σ, the action limits. */
  action: [number, number];
  /** 100 ± tolerance, the acceptance limits. */
  tolerance: [number, number];
}

/** One check as judged now. */
export interface EvaluatedCheck {
  /** The record (as read or as about to be written). */
  record: CheckRecord;
  /** Position in `DriftEvaluation.checks` (time order). */
  index: number;
  /** `span` (certified > 0) or `zero` (zero gas). */
  kind: 'span' | 'zero';
  /** Recovery, % (span checks). */
  recoveryPct?: number;
  /** Prediction interval of the recovery, % (span checks; ±Infinity when unbounded). */
  recoveryLowPct?: number;
  recoveryHighPct?: number;
  /** (recovery − 100)/σ (span checks). */
  controlZ?: number;
  /** σ in force at this check (span checks). */
  sigma?: SigmaChoice;
  /** Control limits in force at this check (span checks). */
  limits?: ControlLimits;
  /** Rules that fired at this check. */
  rules: RuleFiring[];
  /** The recovery is outside 100 ± tolerance (span), or |measured| is not below the detection limit (zero). */
  outsideTolerance: boolean;
  /** The prediction interval reaches beyond the tolerance while the recovery is inside it. */
  nearTolerance: boolean;
  /** The verdict under the evaluation's policy. */
  verdict: Verdict;
  /** Plain words behind the verdict, most important first. */
  reasons: string[];
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
  /** Trend of recovery against time over the latest span checks. */
  trend: DriftTrend;
  /** The latest check by time, if any. */
  latest?: EvaluatedCheck;
  /** Notes: verdicts that differ from those recorded, and other things a reader should know. */
  notes: string[];
}

/**
 * Control limits around 100 % for a σ and a tolerance.
 *
 * @param sigmaPct - σ, % recovery, > 0
 * @param tolerancePct - tolerance, ± % recovery
 * @returns the ±1σ, ±2σ, ±3σ and tolerance limits, % recovery
 */
export function controlLimits(sigmaPct: number, tolerancePct: number): ControlLimits {
  const band = (k: number): [number, number] => [100 - k * sigmaPct, 100 + k * sigmaPct];
  return {
    centrePct: 100,
    sigmaPct,
    oneSigma: band(1),
    warning: band(2),
    action: band(3),
    tolerance: [100 - tolerancePct, 100 + tolerancePct],
  };
}

function sampleSd(values: readonly number[]): { mean: number; sd: number } {
  const mean = values.reduce((s, v) => s + v, 0) / values.length;
  const ss = values.reduce((s, v) => s + (v - mean) ** 2, 0);
  return { mean, sd: Math.sqrt(ss / (values.length - 1)) };
}

function pct(value: number, digits = 2): string {
  if (!Number.isFinite(value)) return value > 0 ? '+∞' : '−∞';
  return value.toFixed(digits);
}

function day(iso: string): string {
  return iso.slice(0, 10);
}

function toleranceSigma(policy: RecheckPolicy, have: number, size: number, extra = ''): SigmaChoice {
  const value = policy.tolerancePct / 3;
  return {
    valuePct: value,
    basis: 'tolerance',
    reason:
      `σ = tolerance/3 = ${pct(policy.tolerancePct, 3).replace(/\.?0+$/, '')} %/3 = ` +
      `${pct(value, 3)} %: ` +
      `${extra || `${have} of the ${size} baseline checks within tolerance exist so far`}` +
      ', so the ±3σ action limit is the tolerance',
  };
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

function label(record: CheckRecord): string {
  return `the check of ${day(record.time)}`;
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

/**
 * Evaluates a gas's check history: per-check rules and verdicts, σ and limits, baseline, trend.
 *
 * @param records - check records (any order; those of other gases are ignored); not modified
 * @param options - policy (tolerance ± %, interval days), gas, baseline and trend sizes, level
 * @returns the evaluation
 * @throws BandwrightError `INVALID_VALUE` for a record without a valid time, for several gases
 *   without `gas`, or for a policy whose tolerance is not > 0
 * @example
 * const evaluation = evaluateHistory(readHistory(path).records, { policy: calibration.method.recheck, gas: 'CO' });
 * evaluation.latest?.verdict; // 'pass' | 'warning' | 'fail'
 */
export function evaluateHistory(records: readonly CheckRecord[], options: EvaluateOptions): DriftEvaluation {
  const policy = options.policy;
  if (!(policy.tolerancePct > 0 && policy.tolerancePct < 100)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `tolerance = ${policy.tolerancePct} %, must be a percentage > 0 and < 100`,
      { parameter: 'tolerancePct' },
    );
  }
  const size = Math.max(2, Math.round(options.baselineChecks ?? DEFAULT_BASELINE_CHECKS));
  const gas = chooseGas(records, options.gas);
  const ordered = timeOrder(records.filter((r) => r.gas === gas));
  const tolerance = policy.tolerancePct;
  const checks: EvaluatedCheck[] = [];
  const spanChecks: number[] = [];
  const spanRecoveries: number[] = [];
  const baseline: Baseline = { size, checks: [], complete: false };
  let frozen: SigmaChoice | undefined;

  const currentSigma = (): SigmaChoice => frozen ?? toleranceSigma(policy, baseline.checks.length, size);

  ordered.forEach((record, index) => {
    if (isZeroCheck(record)) {
      checks.push(judgeZero(record, index));
      return;
    }
    const recovery = recoveryPercent(record.measured, record.certified);
    const deviation = deviationPercent(record.measured, record.certified);
    const sigma = currentSigma();
    const limits = controlLimits(sigma.valuePct, tolerance);
    spanChecks.push(index);
    spanRecoveries.push(recovery);
    const z = spanRecoveries.map((r) => (r - 100) / sigma.valuePct);
    // The check being judged is not in `checks` yet: it labels itself.
    const labels = spanChecks.map((i) => label((checks[i] ?? { record }).record));
    const rules = controlRulesAt(z, z.length - 1, { labels });
    const lowPct = recoveryPercent(record.low, record.certified);
    const highPct = recoveryPercent(record.high, record.certified);
    const outside = Math.abs(deviation) > tolerance;
    const near = !outside && (lowPct < 100 - tolerance || highPct > 100 + tolerance);
    const reasons: string[] = [];
    let verdict: Verdict = 'pass';
    const rejects = rules.filter((r) => r.severity === 'reject');
    if (outside) {
      verdict = 'fail';
      reasons.push(
        `recovery ${pct(recovery)} % is outside the tolerance ${pct(100 - tolerance)}–${pct(100 + tolerance)} %`,
      );
    } else if (rejects.length > 0) {
      verdict = 'fail';
      reasons.push(
        `recovery ${pct(recovery)} % is within the tolerance, ` +
          `but the check is out of statistical control: ${rejects.map((r) => r.rule).join(', ')} fired`,
      );
    } else if (rules.length > 0 || near) {
      verdict = 'warning';
      if (rules.length > 0)
        reasons.push(`recovery ${pct(recovery)} % is within the tolerance; warning rule 1-2s fired`);
      if (near)
        reasons.push(
          `the prediction interval ${pct(lowPct)}–${pct(highPct)} % reaches beyond the tolerance ` +
            `${pct(100 - tolerance)}–${pct(100 + tolerance)} %: the check cannot tell a pass from a fail`,
        );
    } else {
      reasons.push(
        `recovery ${pct(recovery)} % is within the tolerance ` +
          `${pct(100 - tolerance)}–${pct(100 + tolerance)} % and no control rule fired`,
      );
    }
    reasons.push(...rules.map((r) => `${r.rule}: ${r.reason} (σ = ${pct(sigma.valuePct, 3)} %)`));
    checks.push({
      record,
      index,
      kind: 'span',
      recoveryPct: recovery,
      recoveryLowPct: lowPct,
      recoveryHighPct: highPct,
      controlZ: z[z.length - 1],
      sigma,
      limits,
      rules,
      outsideTolerance: outside,
      nearTolerance: near,
      verdict,
      reasons,
    });
    if (!baseline.complete && !outside) {
      baseline.checks.push(index);
      if (baseline.checks.length === size) {
        const values = baseline.checks.map((i) => (checks[i] as EvaluatedCheck).recoveryPct as number);
        const { mean, sd } = sampleSd(values);
        baseline.complete = true;
        baseline.meanPct = mean;
        baseline.sdPct = sd;
        baseline.from = (checks[baseline.checks[0] as number] as EvaluatedCheck).record.time;
        baseline.to = record.time;
        const span = `${day(baseline.from)} to ${day(baseline.to)}`;
        if (!(sd > 0)) {
          frozen = toleranceSigma(
            policy,
            size,
            size,
            `the ${size} baseline checks (${span}) have an SD of 0, which cannot scale the rules`,
          );
        } else {
          const wide =
            3 * sd > tolerance
              ? `; its ±3σ action limit (±${pct(3 * sd)} %) is wider than the tolerance: ` +
                "the checks' repeatability is poor for this tolerance"
              : '';
          frozen = {
            valuePct: sd,
            basis: 'baseline',
            reason:
              `σ = ${pct(sd, 3)} %, the SD of the first ${size} checks within tolerance ` +
              `(${span}, mean ${pct(mean)} %), frozen so that later drift cannot widen the limits${wide}`,
          };
        }
      }
    }
  });

  const sigma = currentSigma();
  const notes = verdictNotes(checks, tolerance);
  const trend = fitDriftTrend(
    spanChecks.map((i) => ({
      time: (checks[i] as EvaluatedCheck).record.time,
      recoveryPct: (checks[i] as EvaluatedCheck).recoveryPct as number,
    })),
    {
      tolerancePct: tolerance,
      maxPoints: options.trendChecks ?? DEFAULT_TREND_CHECKS,
      minimumPoints: options.minimumTrendChecks ?? DEFAULT_MINIMUM_TREND_CHECKS,
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
    trend,
    notes,
  };
  const latest = checks[checks.length - 1];
  if (latest !== undefined) evaluation.latest = latest;
  return evaluation;
}

/** Notes for checks whose verdict now differs from the one recorded. */
function verdictNotes(checks: readonly EvaluatedCheck[], tolerance: number): string[] {
  return checks
    .filter((check) => check.verdict !== check.record.verdict)
    .map((check) => {
      const where = check.record.line === undefined ? '' : ` (history line ${check.record.line})`;
      const sameToleranceNote =
        check.record.tolerancePct === tolerance
          ? '; the checks before it are not those it was judged with, ' +
            'e.g. one was recorded later for an earlier time'
          : '';
      return (
        `${label(check.record)}${where} was recorded as ${check.record.verdict} ` +
        `(tolerance ±${check.record.tolerancePct} %) and is judged ${check.verdict} now ` +
        `(tolerance ±${tolerance} %${sameToleranceNote})`
      );
    });
}

function judgeZero(record: CheckRecord, index: number): EvaluatedCheck {
  const limit = record.detectionLimit;
  const value = `${pct(record.measured, 3)} ${record.unit}`;
  let outside: boolean;
  let reason: string;
  if (limit !== undefined && Number.isFinite(limit) && limit > 0) {
    outside = !(Math.abs(record.measured) < limit);
    reason = outside
      ? `zero gas: |measured| = ${pct(Math.abs(record.measured), 3)} ${record.unit} ` +
        `is not below the detection limit ${pct(limit, 3)} ${record.unit}: the zero has shifted`
      : `zero gas: |measured| = ${pct(Math.abs(record.measured), 3)} ${record.unit} ` +
        `is below the detection limit ${pct(limit, 3)} ${record.unit}, consistent with zero`;
  } else {
    outside = !(record.low <= 0 && record.high >= 0);
    reason =
      'zero gas, judged by the prediction interval ' +
      `(the calibration has no detection limit for ${record.gas}): measured ${value}, ` +
      `interval ${pct(record.low, 3)}–${pct(record.high, 3)} ${record.unit} ` +
      `${outside ? 'excludes' : 'includes'} 0`;
  }
  return {
    record,
    index,
    kind: 'zero',
    rules: [],
    outsideTolerance: outside,
    nearTolerance: false,
    verdict: outside ? 'fail' : 'pass',
    reasons: [reason],
  };
}

/** A new check before it is judged: everything but the verdict, rules and σ. */
export type CheckMeasurementRecord = Omit<
  CheckRecord,
  'verdict' | 'rules' | 'sigmaPct' | 'tolerancePct' | 'line'
>;

/** A new check judged against its history. */
export interface JudgedCheck {
  /** The complete record to append. */
  record: CheckRecord;
  /** The evaluation of the gas's history including the new check. */
  evaluation: DriftEvaluation;
  /** The new check within the evaluation. */
  check: EvaluatedCheck;
}

/**
 * Judges a new check against the existing history and completes its record.
 *
 * @param history - records already in the history (any gases); not modified
 * @param measurement - the new check without verdict (time, gas, values, scan, tool)
 * @param options - the policy and the evaluation options of {@link evaluateHistory} (the gas is the new check's)
 * @returns the record to append, the evaluation with it, and its evaluated check
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
  const evaluation = evaluateHistory([...history, provisional], { ...options, gas: measurement.gas });
  const check = evaluation.checks.find((c) => c.record === provisional) as EvaluatedCheck;
  const record: CheckRecord = {
    ...provisional,
    verdict: check.verdict,
    rules: check.rules.map((r) => r.rule),
    ...(check.sigma === undefined ? {} : { sigmaPct: check.sigma.valuePct }),
  };
  check.record = record;
  evaluation.notes = verdictNotes(evaluation.checks, options.policy.tolerancePct);
  return { record, evaluation, check };
}
