/**
 * The control chart's input from a drift evaluation (`evaluateHistory`): every span check with
 * its recovery, verdict and the rules that fired, the σ and limits in force for the next check,
 * the fitted trend and, when the trend is significant, its projected crossing of the tolerance,
 * and the CUSUM sums of every span check for the panel under the chart. Zero-gas checks have no recovery and are left off the chart (the report's table lists them).
 */
import type { DriftEvaluation } from '../../drift/evaluate.js';
import { DAY_MS } from '../../drift/trend.js';
import type { ControlChartInput, ControlChartTrend } from './control-chart.js';

/**
 * Builds the control-chart input of one gas's evaluated history.
 *
 * @param evaluation - from `evaluateHistory`
 * @param options - `title` (default `<gas> check-standard recoveries`), `nextDue` (ISO) to mark on the time axis
 * @returns the chart input
 */
export function controlChartFromEvaluation(
  evaluation: DriftEvaluation,
  options: { title?: string; nextDue?: string } = {},
): ControlChartInput {
  const records = evaluation.spanChecks.flatMap((position) => {
    const check = evaluation.checks[position];
    if (check === undefined || check.recoveryPct === undefined) return [];
    return [
      {
        time: check.record.time,
        recoveryPct: check.recoveryPct,
        verdict: check.verdict,
        rules: check.rules.map((r) => r.rule),
        label: check.record.scan,
      },
    ];
  });
  const trend = evaluation.trend;
  let chartTrend: ControlChartTrend | undefined;
  if (
    trend.status !== 'insufficient' &&
    trend.origin !== undefined &&
    trend.interceptPct !== undefined &&
    trend.slopePctPerDay !== undefined &&
    trend.from !== undefined &&
    trend.to !== undefined
  ) {
    const to = Date.parse(trend.to);
    const projection = trend.projection;
    // Project to the crossing when the drift is significant; otherwise one recheck interval ahead.
    const crossing =
      projection === undefined || projection.alreadyOutside ? undefined : Date.parse(projection.date);
    const ahead = to + evaluation.policy.everyDays * DAY_MS;
    const until =
      crossing !== undefined && Number.isFinite(crossing)
        ? Math.max(ahead, crossing + 0.1 * (crossing - to))
        : ahead;
    chartTrend = {
      slopePctPerDay: trend.slopePctPerDay,
      interceptPct: trend.interceptPct,
      originTime: trend.origin,
      fittedFrom: trend.from,
      fittedTo: trend.to,
      projectUntil: new Date(until).toISOString(),
      leavesToleranceAt: crossing === undefined ? null : (projection?.date ?? null),
    };
  }
  const cusumPoints = evaluation.spanChecks.flatMap((position) => {
    const check = evaluation.checks[position];
    const point = check?.cusum;
    if (check === undefined || point === undefined) return [];
    return [{ time: check.record.time, upper: point.upper, lower: point.lower, signal: point.signal }];
  });
  return {
    title: options.title ?? `${evaluation.gas} check-standard recoveries`,
    records,
    centrePct: evaluation.limits.centrePct,
    tolerancePct: evaluation.policy.tolerancePct,
    sigmaPct: evaluation.sigma.valuePct,
    sigmaSource: evaluation.sigma.reason,
    ...(chartTrend === undefined ? {} : { trend: chartTrend }),
    ...(options.nextDue === undefined ? {} : { nextDue: options.nextDue }),
    cusum: { k: evaluation.cusum.k, h: evaluation.cusum.h, points: cusumPoints },
  };
}
