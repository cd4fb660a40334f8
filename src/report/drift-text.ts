/**
 * Recheck and status output: text for people (terminal) and JSON for scripts (DESIGN §4
 * `recheck --json`: measured, certified, recoveryPct, low, high, verdict, rules, nextDue, trend).
 */
import type { CheckMeasurement } from '../drift/recheck.js';
import type { ControlLimits, EvaluatedCheck, JudgedCheck, SigmaChoice } from '../drift/evaluate.js';
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

/**
 * A short text for a trend, for table cells.
 *
 * @param trend - the trend
 */
export function trendCell(trend: DriftTrend): string {
  if (trend.status === 'insufficient') return `— (${trend.points} of ${trend.minimumPoints} checks)`;
  if (trend.status === 'none') return 'no significant drift';
  const projection = trend.projection;
  if (projection === undefined) return 'drift';
  return projection.alreadyOutside
    ? `crossed ${projection.limitPct} % ${projection.date.slice(0, 10)}`
    : `${projection.limitPct} % by ${projection.date.slice(0, 10)}`;
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
  const notes = [...m.notes, ...judged.evaluation.notes];
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
  sigma: SigmaChoice | null;
  limits: ControlLimits | null;
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
    reasons: check.reasons,
    schedule,
    history: {
      file: outcome.history,
      line: judged.record.line ?? null,
      created: outcome.created,
      checks: judged.evaluation.checks.length,
    },
    notes: [...m.notes, ...judged.evaluation.notes],
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
    trendCell(row.trend),
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
      notes: row.notes,
    })),
    skipped: report.skipped,
    errors: report.errors,
  };
}
