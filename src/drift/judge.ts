/**
 * Judging one gas's checks in time order (DESIGN §3 "Drift"). Pure; `evaluate.ts` chooses the gas,
 * orders the records and adds the trend and the notes.
 *
 * For each check, in time order:
 * - zero gas (certified 0): pass when |measured| is below the calibration's detection limit
 *   (when the calibration has none: when the prediction interval contains 0), else fail;
 * - otherwise fail when the recovery is outside 100 ± tolerance; within it, fail when a reject
 *   rule fires (out of statistical control), warning when a warning rule fires (1-2s; CUSUM unless
 *   the method makes its signal a fail) or the prediction interval of the measured value reaches
 *   beyond the tolerance (the check cannot tell pass from fail), else pass.
 *
 * σ at each check comes from `sigma.ts` (the frozen baseline SD, the check's own standard error or
 * the floor, whichever is largest). The baseline is the first 8 checks within the tolerance; its
 * SD is frozen from the check after it on. The chart's centre is always 100 % (the certified
 * value). When a rule looks back over earlier checks it expresses them in the σ in force at the
 * check being judged; the CUSUM sums (`cusum.ts`) take each check in the σ in force at that check.
 */
import type { RecheckPolicy } from '../calibration/method.js';
import { CUSUM_START, cusumSettings, cusumStep, type CusumPoint, type CusumSettings } from './cusum.js';
import { deviationPercent, isZeroCheck, recoveryPercent, type CheckRecord, type Verdict } from './record.js';
import { controlRulesAt, formatSigmaMultiple, type RuleFiring } from './rules.js';
import {
  checkStandardErrorPct,
  chooseSigma,
  sigmaFloor,
  type BaselineState,
  type SigmaChoice,
} from './sigma.js';

/** The baseline of checks that fixes the SD candidate of σ once it exists. */
export interface Baseline {
  /** Number of checks it needs. */
  size: number;
  /** Positions (in `DriftEvaluation.checks`) of the checks in it so far, oldest first. */
  checks: number[];
  /** Whether it is complete (its SD is then frozen for all later checks). */
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
  /** σ in force at this check, what set it and why (span checks). */
  sigma?: SigmaChoice;
  /** Control limits in force at this check (span checks). */
  limits?: ControlLimits;
  /** The CUSUM sums after this check, σ (span checks). */
  cusum?: CusumPoint;
  /** Rules that fired at this check (CUSUM among them when it signals). */
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

/** A gas's checks judged in time order. */
export interface JudgedSeries {
  /** Every check in time order. */
  checks: EvaluatedCheck[];
  /** Positions (in `checks`) of the span checks. */
  spanChecks: number[];
  /** The baseline. */
  baseline: Baseline;
  /** The CUSUM settings used. */
  cusumSettings: CusumSettings;
  /** The CUSUM sums the next check starts from (zero after a failed check). */
  cusumState: CusumPoint;
  /** The latest span check's standard error, % (stands in for the next check's). */
  latestSePct?: number;
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

/** A percentage with fixed decimals, ±∞ spelled out. */
export function pct(value: number, digits = 2): string {
  if (!Number.isFinite(value)) return value > 0 ? '+∞' : '−∞';
  return value.toFixed(digits);
}

/** The short label of a check in notes and rule reasons: `the check of YYYY-MM-DD`. */
export function checkLabel(record: Pick<CheckRecord, 'time'>): string {
  return `the check of ${record.time.slice(0, 10)}`;
}

/** The σ-candidates' view of the baseline (its SD only once complete). */
function baselineState(baseline: Baseline): BaselineState {
  const state: BaselineState = { size: baseline.size, have: baseline.checks.length };
  if (baseline.complete && baseline.sdPct !== undefined) {
    state.sdPct = baseline.sdPct;
    if (baseline.meanPct !== undefined) state.meanPct = baseline.meanPct;
    if (baseline.from !== undefined) state.from = baseline.from;
    if (baseline.to !== undefined) state.to = baseline.to;
  }
  return state;
}

/**
 * σ for a check that is not judged yet (the chart's current limits): the latest span check's
 * standard error stands in for the next check's.
 *
 * @param policy - the recheck policy
 * @param series - the judged series
 */
export function sigmaForNext(policy: RecheckPolicy, series: JudgedSeries): SigmaChoice {
  return chooseSigma(policy, baselineState(series.baseline), series.latestSePct);
}

function cusumFiring(
  point: CusumPoint,
  settings: CusumSettings,
  position: number,
  labels: readonly string[],
): RuleFiring | undefined {
  if (point.signal === null) return undefined;
  const below = point.signal === 'below';
  const sum = below ? point.lower : point.upper;
  const since = (below ? point.lowerSince : point.upperSince) ?? position;
  const checks: number[] = [];
  for (let i = since; i <= position; i++) checks.push(i);
  return {
    rule: 'CUSUM',
    severity: settings.onSignal === 'fail' ? 'reject' : 'warning',
    checks,
    reason:
      `the ${below ? 'lower' : 'upper'} cumulative sum is ${formatSigmaMultiple(sum).replace(/^\+/, '')}, beyond the ` +
      `decision interval h = ${settings.h}σ (reference value k = ${settings.k}σ): from ${labels[since]} to ` +
      `${labels[position]} the checks have stayed ${below ? 'below' : 'above'} the certified value by more ` +
      `than k on the whole, a slow persistent drift ${below ? 'low' : 'high'}`,
  };
}

/**
 * Judges one gas's records, already in time order.
 *
 * @param ordered - the gas's records in time order; not modified
 * @param policy - tolerance (± %), floor and CUSUM settings
 * @param baselineSize - checks within tolerance that make the baseline (≥ 2)
 * @returns every check judged, the span positions, the baseline and the CUSUM state
 */
export function judgeSeries(
  ordered: readonly CheckRecord[],
  policy: RecheckPolicy,
  baselineSize: number,
): JudgedSeries {
  const tolerance = policy.tolerancePct;
  const settings = cusumSettings(policy);
  const checks: EvaluatedCheck[] = [];
  const spanChecks: number[] = [];
  const spanDeviations: number[] = [];
  const labels: string[] = [];
  const baseline: Baseline = { size: baselineSize, checks: [], complete: false };
  let cusumState = CUSUM_START;
  let latestSePct: number | undefined;

  ordered.forEach((record, index) => {
    if (isZeroCheck(record)) {
      checks.push(judgeZero(record, index));
      return;
    }
    const recovery = recoveryPercent(record.measured, record.certified);
    const deviation = deviationPercent(record.measured, record.certified);
    const sePct = checkStandardErrorPct(record);
    latestSePct = sePct;
    const sigma = chooseSigma(policy, baselineState(baseline), sePct);
    const limits = controlLimits(sigma.valuePct, tolerance);
    const position = spanChecks.length;
    spanChecks.push(index);
    spanDeviations.push(deviation);
    labels.push(checkLabel(record));
    const z = spanDeviations.map((d) => d / sigma.valuePct);
    const zHere = z[position] as number;
    const rules = controlRulesAt(z, position, {
      labels,
      // A run's offset smaller than one check resolves, or than the floor, is not a shift worth a reject.
      runOffsetFloor: Math.max(sePct ?? 0, sigmaFloor(policy).valuePct) / sigma.valuePct,
    });
    const cusum = cusumStep(cusumState, zHere, position, settings);
    const cusumRule = cusumFiring(cusum, settings, position, labels);
    if (cusumRule !== undefined) rules.push(cusumRule);
    const lowPct = recoveryPercent(record.low, record.certified);
    const highPct = recoveryPercent(record.high, record.certified);
    const outside = Math.abs(deviation) > tolerance;
    const near = !outside && (lowPct < 100 - tolerance || highPct > 100 + tolerance);
    const { verdict, reasons } = spanVerdict({ recovery, lowPct, highPct, outside, near, rules, tolerance });
    reasons.push(
      ...rules.map((r) =>
        r.rule === 'CUSUM'
          ? `CUSUM: ${r.reason} (σ in force at each check)`
          : `${r.rule}: ${r.reason} (σ = ${pct(sigma.valuePct, 3)} %)`,
      ),
    );
    checks.push({
      record,
      index,
      kind: 'span',
      recoveryPct: recovery,
      recoveryLowPct: lowPct,
      recoveryHighPct: highPct,
      controlZ: zHere,
      sigma,
      limits,
      cusum,
      rules,
      outsideTolerance: outside,
      nearTolerance: near,
      verdict,
      reasons,
    });
    cusumState = verdict === 'fail' ? CUSUM_START : cusum;
    if (!baseline.complete && !outside) {
      baseline.checks.push(index);
      if (baseline.checks.length === baseline.size) {
        const values = baseline.checks.map((i) => (checks[i] as EvaluatedCheck).recoveryPct as number);
        const { mean, sd } = sampleSd(values);
        baseline.complete = true;
        baseline.meanPct = mean;
        baseline.sdPct = sd;
        baseline.from = (checks[baseline.checks[0] as number] as EvaluatedCheck).record.time;
        baseline.to = record.time;
      }
    }
  });
  const series: JudgedSeries = { checks, spanChecks, baseline, cusumSettings: settings, cusumState };
  if (latestSePct !== undefined) series.latestSePct = latestSePct;
  return series;
}

function spanVerdict(input: {
  recovery: number;
  lowPct: number;
  highPct: number;
  outside: boolean;
  near: boolean;
  rules: readonly RuleFiring[];
  tolerance: number;
}): { verdict: Verdict; reasons: string[] } {
  const { recovery, lowPct, highPct, outside, near, rules, tolerance } = input;
  const range = `${pct(100 - tolerance)}–${pct(100 + tolerance)} %`;
  const rejects = rules.filter((r) => r.severity === 'reject');
  const warnings = rules.filter((r) => r.severity === 'warning');
  if (outside)
    return { verdict: 'fail', reasons: [`recovery ${pct(recovery)} % is outside the tolerance ${range}`] };
  if (rejects.length > 0)
    return {
      verdict: 'fail',
      reasons: [
        `recovery ${pct(recovery)} % is within the tolerance, ` +
          `but the check is out of statistical control: ${rejects.map((r) => r.rule).join(', ')} fired`,
      ],
    };
  if (warnings.length > 0 || near) {
    const reasons: string[] = [];
    if (warnings.length > 0)
      reasons.push(
        `recovery ${pct(recovery)} % is within the tolerance; ` +
          `warning rule${warnings.length > 1 ? 's' : ''} ${warnings.map((r) => r.rule).join(', ')} fired`,
      );
    if (near)
      reasons.push(
        `the prediction interval ${pct(lowPct)}–${pct(highPct)} % reaches beyond the tolerance ` +
          `${range}: the check cannot tell a pass from a fail`,
      );
    return { verdict: 'warning', reasons };
  }
  return {
    verdict: 'pass',
    reasons: [`recovery ${pct(recovery)} % is within the tolerance ${range} and no control rule fired`],
  };
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
