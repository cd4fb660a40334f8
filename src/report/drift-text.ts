/**
 * Recheck and status output: text for people (terminal) and JSON for scripts (DESIGN §4
 * `recheck --json`: measured, certified, recoveryPct, low, high, verdict, rules, nextDue, trend;
 * then σ and what set it, the CUSUM chart, and the verdicts a late entry changed).
 */
import type { CheckMeasurement } from '../drift/recheck.js';
import type { CusumDirection } from '../drift/cusum.js';
import type {
  ControlLimits,
  CusumSummary,
  EvaluatedCheck,
  JudgedCheck,
  SigmaChoice,
} from '../drift/evaluate.js';
import type { Verdict } from '../drift/record.js';
import type { RuleFiring } from '../drift/rules.js';
import type { Schedule, ScheduleState } from '../drift/schedule.js';
import type { GasStatus } from '../drift/status.js';
import type { DriftTrend } from '../drift/trend.js';
import { unitLabel, type ConcentrationUnit } from '../gas/units.js';
import { TOOL } from '../version.js';
import type { ToolStamp } from './results.js';
import { formatNumber, formatTextTable } from './table.js';

/** Everything a recheck produced, for output. */
export interface RecheckOutcome {
  /** The calibration file and its hash. */
  calibration: { file: string; sha256: string };
  /** The history file written. */
  history: string;
  /** Whether the history was created by this recheck. */
  created: boolean;
  /** The measurement of the check scan. */
  measurement: CheckMeasurement;
  /** The judged check (record with its line, evaluation). */
  judged: JudgedCheck;
  /** Schedule after the check. */
  schedule: Schedule;
  /** Prediction-interval level. */
  level: number;
}

function percent(value: number | undefined, digits = 2): string {
  if (value === undefined) return '—';
  if (!Number.isFinite(value)) return value > 0 ? '+∞' : '−∞';
  return value.toFixed(digits);
}

function minute(iso: string | undefined): string {
  return iso === undefined ? '—' : `${iso.slice(0, 10)} ${iso.slice(11, 16)}Z`;
}

function trendText(trend: DriftTrend): string {
  if (trend.status === 'insufficient') return `— (${trend.points} of ${trend.minimumPoints} checks)`;
  if (trend.status === 'none') return 'no significant drift';
  const projection = trend.projection;
  if (projection === undefined) return 'drift';
  return projection.alreadyOutside
    ? `crossed ${projection.limitPct} % ${projection.date.slice(0, 10)}`
    : `${projection.limitPct} % by ${projection.date.slice(0, 10)}`;
}

/**
 * A short text for the CUSUM chart, for table cells: `CUSUM low` (or `high`) when it signals,
 * else the larger sum against h, e.g. `CUSUM 1.3/5σ`.
 *
 * @param cusum - the chart after the latest check
 */
export function cusumCell(cusum: Pick<CusumSummary, 'upper' | 'lower' | 'h' | 'signal'>): string {
  if (cusum.signal !== null) return `CUSUM ${cusum.signal === 'below' ? 'low' : 'high'}`;
  return `CUSUM ${Math.max(cusum.upper, cusum.lower).toFixed(1)}/${cusum.h}σ`;
}

/**
 * A short text for a trend, for table cells, with the CUSUM chart after it when given.
 *
 * @param trend - the trend
 * @param cusum - the CUSUM chart after the latest check
 */
export function trendCell(trend: DriftTrend, cusum?: CusumSummary): string {
  const text = trendText(trend);
  return cusum === undefined || trend.points === 0 ? text : `${text}; ${cusumCell(cusum)}`;
}

/** The CUSUM chart at one check, as the recheck JSON gives it (σ units). */
export interface CusumEntry {
  /** Reference value k, σ. */
  k: number;
  /** Decision interval h, σ. */
  h: number;
  /** C⁺ after the check, σ. */
  upper: number;
  /** C⁻ after the check, σ. */
  lower: number;
  /** `below` or `above` when a sum is beyond h at this check, else null. */
  signal: CusumDirection | null;
  /** The verdict a signal gives: `warning` (default) or `fail`. */
  onSignal: CusumSummary['onSignal'];
  /** Time of the first check of the rise that signals, ISO, or null. */
  since: string | null;
}

function cusumAt(judged: JudgedCheck): CusumEntry | null {
  const point = judged.check.cusum;
  if (point === undefined) return null;
  const { spanChecks, checks } = judged.evaluation;
  const sinceIndex =
    point.signal === 'below' ? point.lowerSince : point.signal === 'above' ? point.upperSince : undefined;
  const since = sinceIndex === undefined ? undefined : checks[spanChecks[sinceIndex] as number];
  const settings = judged.evaluation.cusum;
  return {
    k: settings.k,
    h: settings.h,
    upper: point.upper,
    lower: point.lower,
    signal: point.signal,
    onSignal: settings.onSignal,
    since: since?.record.time ?? null,
  };
}

function cusumRow(entry: CusumEntry): string {
  const sums = `C⁺ = ${entry.upper.toFixed(2)}σ, C⁻ = ${entry.lower.toFixed(2)}σ (k = ${entry.k}σ, h = ${entry.h}σ)`;
  if (entry.signal === null) return `${sums}: no signal`;
  return (
    `${sums}: signal, drifting ${entry.signal === 'below' ? 'low' : 'high'}` +
    `${entry.since === null ? '' : ` since ${entry.since.slice(0, 10)}`} (${entry.onSignal})`
  );
}

/** Notes of a recheck: the verdicts it changed, and a count of other checks judged differently. */
function recheckNotes(judged: JudgedCheck): string[] {
  const changed = new Set(judged.changed.map((c) => c.check.index));
  const others = judged.evaluation.revisions.filter((r) => !changed.has(r.index));
  const notes = judged.changed.map((c) => c.note);
  if (others.length > 0)
    notes.push(
      `${others.length} earlier check${others.length === 1 ? ' is' : 's are'} judged differently now than ` +
        'when recorded; the status of the calibration lists them with the cause',
    );
  return notes;
}

/**
 * The recheck as text: values, σ and why, limits, the rules that fired and why, verdict, trend,
 * next due, and the safety caution.
 *
 * @param outcome - the recheck
 */
export function formatRecheckText(outcome: RecheckOutcome): string {
  const { measurement: m, judged, schedule } = outcome;
  const check = judged.check;
  const record = judged.record;
  const unit = unitLabel(m.unit);
  const level = `${Math.round(outcome.level * 100)} %`;
  const tolerance = judged.evaluation.policy.tolerancePct;
  const rows: [string, string][] = [
    ['scan', `${record.scan} (sha256 ${record.scanSha256.slice(0, 12)}…)`],
    [
      'measured at',
      `${record.time}${record.time === record.recordedAt ? '' : ` (recorded ${record.recordedAt})`}`,
    ],
    ['certified', `${formatNumber(m.certified)} ${unit}${m.certified === 0 ? ' (zero gas)' : ''}`],
    [
      'measured',
      `${formatNumber(m.measured)} ${unit}, ${level} interval ` +
        `${formatNumber(m.low)} to ${formatNumber(m.high)} ${unit} (se ${formatNumber(m.se, 3)})`,
    ],
  ];
  if (check.kind === 'span') {
    rows.push([
      'recovery',
      `${percent(check.recoveryPct)} % ` +
        `(interval ${percent(check.recoveryLowPct)} to ${percent(check.recoveryHighPct)} %); ` +
        `tolerance ${percent(100 - tolerance)} to ${percent(100 + tolerance)} %`,
    ]);
  } else if (m.detectionLimit !== undefined) {
    rows.push(['zero gas', `judged against the detection limit ${formatNumber(m.detectionLimit)} ${unit}`]);
  }
  if (m.z !== undefined) rows.push(['z', `${percent(m.z)}: (measured − certified) / se of the prediction`]);
  if (check.sigma !== undefined && check.limits !== undefined) {
    rows.push(['σ', check.sigma.reason]);
    rows.push([
      'limits',
      `±2σ ${percent(check.limits.warning[0])}–${percent(check.limits.warning[1])} %, ` +
        `±3σ ${percent(check.limits.action[0])}–${percent(check.limits.action[1])} %`,
    ]);
  }
  const cusum = cusumAt(judged);
  if (cusum !== null) rows.push(['CUSUM', cusumRow(cusum)]);
  rows.push([
    'rules fired',
    check.rules.length === 0 ? 'none' : check.rules.map((r) => `${r.rule} (${r.severity})`).join(', '),
  ]);
  for (const rule of check.rules) rows.push(['', `${rule.rule}: ${rule.reason}`]);
  rows.push(['verdict', `${check.verdict.toUpperCase()}: ${check.reasons[0] ?? ''}`]);
  for (const reason of check.reasons
    .slice(1)
    .filter((r) => !check.rules.some((rule) => r.startsWith(`${rule.rule}:`))))
    rows.push(['', reason]);
  rows.push(['trend', judged.evaluation.trend.summary]);
  rows.push([
    'next due',
    schedule.nextDue === undefined
      ? `none: ${schedule.reason}`
      : `${minute(schedule.nextDue)} (${schedule.reason})`,
  ]);
  rows.push([
    'history',
    `${outcome.history} line ${record.line ?? '?'}${outcome.created ? ' (new history)' : ''}, ` +
      `${judged.evaluation.checks.length} check(s) of ${m.gas}`,
  ]);
  const width = Math.max(...rows.map(([k]) => k.length));
  const lines = [
    `Recheck of ${m.gas} with ${outcome.calibration.file} (sha256 ${outcome.calibration.sha256.slice(0, 12)}…)`,
    ...rows.map(([k, v]) => `  ${k.padEnd(width)}  ${v}`),
  ];
  const notes = [...m.notes, ...recheckNotes(judged)];
  if (notes.length > 0) lines.push('Notes:', ...notes.map((n) => `  ${n}`));
  if (m.result.cautions.length > 0) lines.push('Caution:', ...m.result.cautions.map((c) => `  ${c}`));
  return lines.join('\n');
}

/** The `recheck --json` document (`recheckDocument`); `null` stands for a value that is absent. */
export interface RecheckDocument {
  /** The tool that wrote it. */
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
  /** σ at this check: value, what set it (`baseline`, `check-se`, `floor`), the candidates, why. */
  sigma: SigmaChoice | null;
  limits: ControlLimits | null;
  /** The CUSUM chart after this check (null for zero gas). */
  cusum: CusumEntry | null;
  /** Earlier checks whose verdict this check changed (it was recorded for an earlier time). */
  changedVerdicts: { time: string; line: number | null; from: Verdict; to: Verdict; note: string }[];
  reasons: string[];
  schedule: Schedule;
  history: { file: string; line: number | null; created: boolean; checks: number };
  notes: string[];
  cautions: string[];
}

/**
 * The recheck as a JSON document (DESIGN §4 fields first, then the detail).
 *
 * @param outcome - the recheck
 */
export function recheckDocument(outcome: RecheckOutcome): RecheckDocument {
  const { measurement: m, judged, schedule } = outcome;
  const check = judged.check;
  const finite = (v: number): number | null => (Number.isFinite(v) ? v : null);
  return {
    tool: { name: TOOL.name, version: TOOL.version },
    calibration: outcome.calibration,
    gas: m.gas,
    unit: m.unit,
    measured: m.measured,
    certified: m.certified,
    recoveryPct: check.recoveryPct ?? null,
    low: finite(m.low),
    high: finite(m.high),
    verdict: check.verdict,
    rules: check.rules.map((r) => ({ rule: r.rule, severity: r.severity, reason: r.reason })),
    nextDue: schedule.nextDue ?? null,
    trend: judged.evaluation.trend,
    time: judged.record.time,
    recordedAt: judged.record.recordedAt,
    scan: { path: judged.record.scan, sha256: judged.record.scanSha256 },
    level: outcome.level,
    se: m.se,
    z: m.z ?? null,
    detectionLimit: m.detectionLimit ?? null,
    kind: check.kind,
    recoveryLowPct: check.recoveryLowPct === undefined ? null : finite(check.recoveryLowPct),
    recoveryHighPct: check.recoveryHighPct === undefined ? null : finite(check.recoveryHighPct),
    tolerancePct: judged.evaluation.policy.tolerancePct,
    everyDays: judged.evaluation.policy.everyDays,
    nearTolerance: check.nearTolerance,
    sigma: check.sigma ?? null,
    limits: check.limits ?? null,
    cusum: cusumAt(judged),
    changedVerdicts: judged.changed.map((c) => ({
      time: c.check.record.time,
      line: c.check.record.line ?? null,
      from: c.before,
      to: c.after,
      note: c.note,
    })),
    reasons: check.reasons,
    schedule,
    history: {
      file: outcome.history,
      line: judged.record.line ?? null,
      created: outcome.created,
      checks: judged.evaluation.checks.length,
    },
    notes: [...m.notes, ...recheckNotes(judged)],
    cautions: m.result.cautions,
  };
}

/** A calibration `status` could not judge. */
export interface StatusProblem {
  /** The file. */
  file: string;
  /** Why. */
  message: string;
}

/** Everything `status` found. */
export interface StatusReport {
  /** The time judged at, ISO. */
  now: string;
  /** Per calibration gas. */
  rows: GasStatus[];
  /** JSON files that are not calibrations. */
  skipped: StatusProblem[];
  /** Calibrations or histories that could not be read. */
  errors: StatusProblem[];
  /** The exit status. */
  exitStatus: number;
}

/**
 * The status table: one row per calibration gas, then reasons, skipped files and errors.
 *
 * @param report - what status found
 */
export function formatStatusText(report: StatusReport): string {
  const columns = [
    { header: 'calibration' },
    { header: 'gas' },
    { header: 'last check' },
    { header: 'verdict' },
    { header: 'recovery %', align: 'right' as const },
    { header: 'next due' },
    { header: 'days overdue', align: 'right' as const },
    { header: 'state' },
    { header: 'trend' },
  ];
  const rows = report.rows.map((row) => [
    row.file,
    row.gas,
    minute(row.lastCheck?.time),
    row.lastCheck?.verdict ?? 'never checked',
    row.lastCheck?.recoveryPct === undefined
      ? row.lastCheck === undefined
        ? ''
        : 'zero gas'
      : percent(row.lastCheck.recoveryPct),
    row.schedule.nextDue === undefined ? 'now' : minute(row.schedule.nextDue),
    row.schedule.daysOverdue > 0 ? row.schedule.daysOverdue.toFixed(1) : '',
    row.schedule.state.toUpperCase(),
    trendCell(row.trend, row.cusum),
  ]);
  const parts = [`Recheck status at ${minute(report.now)}`];
  if (rows.length > 0) parts.push(formatTextTable(columns, rows));
  else parts.push('no calibrations found');
  const notes: string[] = [];
  for (const row of report.rows) {
    notes.push(
      `${row.file} ${row.gas}: ${row.schedule.reason}; ` +
        `every ${row.policy.everyDays} days, tolerance ±${row.policy.tolerancePct} %`,
    );
    if (row.trend.status !== 'insufficient') notes.push(`${row.file} ${row.gas}: trend ${row.trend.summary}`);
    if (row.checks > 0) notes.push(`${row.file} ${row.gas}: ${row.cusum.summary}`);
    for (const note of row.notes) notes.push(`${row.file} ${row.gas}: ${note}`);
  }
  if (notes.length > 0) parts.push(notes.join('\n'));
  if (report.skipped.length > 0)
    parts.push(['Skipped:', ...report.skipped.map((s) => `  ${s.file}: ${s.message}`)].join('\n'));
  if (report.errors.length > 0)
    parts.push(['Errors:', ...report.errors.map((e) => `  ${e.file}: ${e.message}`)].join('\n'));
  return parts.join('\n\n');
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
  /** The CUSUM chart after the latest check (σ units). */
  cusum: CusumSummary;
  notes: string[];
}

/** The `status --json` document (`statusDocument`). */
export interface StatusDocument {
  /** The tool that wrote it. */
  tool: ToolStamp;
  /** The time judged at, ISO. */
  now: string;
  exitStatus: number;
  calibrations: StatusEntry[];
  skipped: StatusProblem[];
  errors: StatusProblem[];
}

/**
 * The status as a JSON document for schedulers.
 *
 * @param report - what status found
 */
export function statusDocument(report: StatusReport): StatusDocument {
  return {
    tool: { name: TOOL.name, version: TOOL.version },
    now: report.now,
    exitStatus: report.exitStatus,
    calibrations: report.rows.map((row) => ({
      file: row.file,
      sha256: row.calibrationSha256,
      title: row.title ?? null,
      gas: row.gas,
      unit: row.unit,
      everyDays: row.policy.everyDays,
      tolerancePct: row.policy.tolerancePct,
      checks: row.checks,
      lastCheck: row.lastCheck ?? null,
      state: row.schedule.state,
      nextDue: row.schedule.nextDue ?? null,
      daysUntilDue: row.schedule.daysUntilDue ?? null,
      daysOverdue: row.schedule.daysOverdue,
      reason: row.schedule.reason,
      trend: row.trend,
      cusum: row.cusum,
      notes: row.notes,
    })),
    skipped: report.skipped,
    errors: report.errors,
  };
}
