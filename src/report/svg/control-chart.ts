/**
 * Control chart of check-standard recoveries (DESIGN §3 "Drift"): recovery % against time, the
 * certified value (centre line), the tolerance, Shewhart warning (±2σ) and action (±3σ) limits,
 * every check marked by its verdict, the checks where a control rule fired ringed and labelled
 * with the rule, and the fitted trend with its projection to where it leaves the tolerance.
 *
 * The input is a plain record list, documented below, so any recheck history can be drawn: the
 * drift evaluation supplies σ and its origin, the verdicts, the rules that fired and the trend.
 * When the input carries the CUSUM sums, a second panel under the chart draws them on the same
 * time axis (`cusum-panel.ts`).
 */
import { scaleUtc } from 'd3-scale';
import { line, symbolCircle, symbolCross, symbolDiamond, symbolTriangle } from 'd3-shape';
import { BandwrightError } from '../../errors.js';
import { formatNumber } from '../table.js';
import {
  clipPath,
  legendAndPanel,
  linearAxisScale,
  markerPath,
  notesBelow,
  noteText,
  panelAxes,
  svgDocument,
  type LegendEntry,
  type PlotOptions,
} from './chart.js';
import { element, escapeText, translate } from './markup.js';
import { ALERT, INK, MUTED, seriesStyle } from './palette.js';
import {
  horizontalRule,
  panelBelow,
  panelBottom,
  panelFrame,
  PLOT_MARGIN,
  verticalRule,
  type RuleStyle,
} from './panel.js';
import { significantDigits } from '../../words.js';
import { CUSUM_PANEL_HEIGHT, renderCusumPanel, type ControlChartCusum } from './cusum-panel.js';

/** Verdict of one check. */
export type CheckVerdict = 'pass' | 'warning' | 'fail';

/** One check on the chart. */
export interface ControlChartRecord {
  /** When the check was measured, ISO 8601. */
  time: string;
  /** Recovery, % (measured / certified × 100). */
  recoveryPct: number;
  /** Verdict of the check. */
  verdict: CheckVerdict;
  /** Control rules that fired at this check, e.g. `1-2s`, `2-2s` (empty when none). */
  rules: readonly string[];
  /** Scan or note shown on hover (plain text). */
  label?: string;
}

/** A straight-line trend of recovery against time, with its projection. */
export interface ControlChartTrend {
  /** Slope, % per day. */
  slopePctPerDay: number;
  /** Recovery at `originTime`, %. */
  interceptPct: number;
  /** Time the intercept refers to, ISO 8601. */
  originTime: string;
  /** First and last time of the checks the trend was fitted to, ISO 8601. */
  fittedFrom: string;
  /** See {@link ControlChartTrend.fittedFrom}. */
  fittedTo: string;
  /** Draw the projection (dashed) up to this time, ISO 8601. */
  projectUntil: string;
  /**
   * When the projected trend leaves the tolerance, ISO 8601, or null/undefined when it does not
   * within the projection.
   */
  leavesToleranceAt?: string | null;
}

/** Everything the control chart draws. Plain data. */
export interface ControlChartInput {
  /** Title (default `Check-standard recoveries`). */
  title?: string;
  /** The checks, any order (drawn by time). */
  records: readonly ControlChartRecord[];
  /** Centre line, % (the certified value: 100). */
  centrePct: number;
  /** Acceptance tolerance, ± % around the centre. */
  tolerancePct: number;
  /** σ of recoveries, %, for the ±2σ and ±3σ lines. */
  sigmaPct: number;
  /** Which σ and why, in words (e.g. `tolerance/3 until 8 checks exist`). */
  sigmaSource: string;
  /** Trend and projection, when fitted. */
  trend?: ControlChartTrend;
  /** When the next recheck is due, ISO 8601 (drawn as a tick on the time axis). */
  nextDue?: string;
  /** The CUSUM sums of the checks, drawn in a panel under the chart. */
  cusum?: ControlChartCusum;
}

/** Size options of {@link renderControlChart} (default id `control-chart`). */
export interface ControlChartOptions extends PlotOptions {
  /** Panel height, px (default 280). */
  panelHeight?: number;
  /** Recovery axis [bottom, top], %, used as given (default: limits and data with a margin). */
  recoveryDomain?: readonly [number, number];
}

/** Splits text into lines of at most `width` characters at spaces (a longer word stays whole). */
export function wrapWords(text: string, width: number): string[] {
  const lines: string[] = [];
  let current = '';
  for (const word of text.split(/\s+/)) {
    if (current !== '' && current.length + 1 + word.length > width) {
      lines.push(current);
      current = word;
    } else current = current === '' ? word : `${current} ${word}`;
  }
  if (current !== '') lines.push(current);
  return lines;
}
const DAY_MS = 86_400_000;

function timeOf(text: string, what: string): number {
  const value = Date.parse(text);
  if (!Number.isFinite(value))
    throw new BandwrightError(
      'INVALID_VALUE',
      `control chart: ${what} = ${JSON.stringify(text)}, must be an ISO 8601 time`,
      { parameter: what },
    );
  return value;
}

/** Tick label for a time: the date, with the time of day only when ticks fall inside days. */
function timeFormatter(ticks: readonly Date[]): (value: number) => string {
  const whole = ticks.every((t) => t.getTime() % DAY_MS === 0);
  return (value: number) => {
    const iso = new Date(value).toISOString();
    return whole ? iso.slice(0, 10) : `${iso.slice(0, 10)} ${iso.slice(11, 16)}`;
  };
}

/**
 * Draws the control chart.
 *
 * Classes: `check` markers (`data-verdict`, `data-recovery`, `data-time`, at
 * `transform="translate(x,y)"`), `rule-violation` rings and `rule-label` texts, `centre-line`,
 * `tolerance-line`, `warning-line` (±2σ), `action-line` (±3σ), `trend-line`, `trend-projection`,
 * `leaves-tolerance`, `panel-frame`, axes with `axis-label`, `legend`; with `input.cusum`, the
 * classes of `renderCusumPanel` in a `cusum-panel` group under the chart.
 *
 * @param input - records, limits, σ, trend
 * @param options - id, size, fixed recovery domain
 * @returns SVG markup
 * @throws BandwrightError `INVALID_VALUE` for a time that is not ISO 8601, a non-finite recovery, or σ/tolerance ≤ 0
 */
export function renderControlChart(input: ControlChartInput, options: ControlChartOptions = {}): string {
  const id = options.id ?? 'control-chart';
  const width = options.width ?? 720;
  if (!(input.tolerancePct > 0))
    throw new BandwrightError(
      'INVALID_VALUE',
      `control chart: tolerancePct = ${input.tolerancePct}, must be > 0`,
      { parameter: 'tolerancePct' },
    );
  if (!(input.sigmaPct > 0))
    throw new BandwrightError('INVALID_VALUE', `control chart: sigmaPct = ${input.sigmaPct}, must be > 0`, {
      parameter: 'sigmaPct',
    });
  const records = input.records
    .map((record, i) => {
      if (!Number.isFinite(record.recoveryPct))
        throw new BandwrightError(
          'INVALID_VALUE',
          `control chart: records[${i}].recoveryPct = ${record.recoveryPct}, must be a finite number`,
          { parameter: `records[${i}]` },
        );
      return { ...record, at: timeOf(record.time, `records[${i}].time`) };
    })
    .sort((a, b) => a.at - b.at);

  const warningStyle = { colour: seriesStyle(1).colour, dash: '7 3' };
  const actionStyle = { colour: seriesStyle(2).colour, dash: '9 3 2 3' };
  const trendStyle = seriesStyle(0);
  const legendEntries: LegendEntry[] = [
    { label: 'pass', colour: INK, marker: symbolCircle },
    { label: 'warning', colour: seriesStyle(1).colour, marker: symbolTriangle },
    { label: 'fail', colour: ALERT, marker: symbolCross },
    {
      label: `tolerance ±${significantDigits(input.tolerancePct, 3)} %`,
      colour: ALERT,
      line: true,
      lineWidth: 2,
    },
    {
      label: `±2σ warning (σ = ${significantDigits(input.sigmaPct, 3)} %)`,
      colour: warningStyle.colour,
      dash: warningStyle.dash,
      line: true,
    },
    { label: '±3σ action', colour: actionStyle.colour, dash: actionStyle.dash, line: true },
  ];
  if (input.trend !== undefined) {
    legendEntries.push({ label: 'trend', colour: trendStyle.colour, line: true, lineWidth: 2 });
    legendEntries.push({
      label: 'projection',
      colour: trendStyle.colour,
      dash: '3 3',
      line: true,
      lineWidth: 2,
    });
  }
  // The strip between legend and panel holds the labels of the control rules that fired.
  const { legend, panel } = legendAndPanel(legendEntries, {
    width,
    panelHeight: options.panelHeight ?? 280,
    gap: 36,
  });
  const footnotes: string[] = [];
  const crossing = input.trend?.leavesToleranceAt;
  const sigmaLines = [
    ...wrapWords(`σ: ${input.sigmaSource}`, Math.floor(panel.width / 6.2)),
    ...(crossing === undefined || crossing === null ? [] : ['']),
  ];
  const cusumPanel = input.cusum === undefined ? undefined : panelBelow(panel, CUSUM_PANEL_HEIGHT);
  const lowest = cusumPanel ?? panel;
  const height = panelBottom(lowest) + PLOT_MARGIN.bottom + 8 + 14 * sigmaLines.length;

  const times = records.map((r) => r.at);
  if (input.trend !== undefined) times.push(timeOf(input.trend.projectUntil, 'trend.projectUntil'));
  if (input.nextDue !== undefined) times.push(timeOf(input.nextDue, 'nextDue'));
  let start = times.length > 0 ? Math.min(...times) : Date.UTC(2000, 0, 1);
  let end = times.length > 0 ? Math.max(...times) : start + DAY_MS;
  if (end - start < DAY_MS) {
    start -= DAY_MS / 2;
    end += DAY_MS / 2;
  }
  const pad = (end - start) * 0.03;
  const time = scaleUtc()
    .domain([new Date(start - pad), new Date(end + pad)])
    .range([panel.left, panel.left + panel.width]);
  // Date labels are about 70 px wide: keep every k-th tick so neighbours never touch.
  const allTicks = time.ticks(6);
  const spacing =
    allTicks.length > 1
      ? (panel.width * (allTicks[1]!.getTime() - allTicks[0]!.getTime())) / (end - start + 2 * pad)
      : panel.width;
  const every = Math.max(1, Math.ceil(84 / Math.max(spacing, 1)));
  const timeTicks = allTicks.filter((_, i) => i % every === 0);
  const px = (t: number): number => time(new Date(t));

  const c = input.centrePct;
  const reach = Math.max(input.tolerancePct, 3 * input.sigmaPct) * 1.25;
  const values = [c - reach, c + reach, ...records.map((r) => r.recoveryPct)];
  const y = linearAxisScale(
    options.recoveryDomain ?? [Math.min(...values), Math.max(...values)],
    [panelBottom(panel), panel.top],
    { nice: options.recoveryDomain === undefined },
  );
  const py = (v: number): number => y.scale(v);
  const clip = `${id}-clip`;
  const defs = clipPath(clip, panel);

  const timeAxis = {
    ticks: timeTicks.map((t) => t.getTime()),
    position: px,
    format: timeFormatter(timeTicks),
    label: 'check time (UTC)',
  };
  const body: string[] = [
    panelFrame(panel),
    panelAxes(panel, timeAxis, { ticks: y.ticks, position: py, format: y.format, label: 'recovery / %' }),
  ];
  if (cusumPanel !== undefined && input.cusum !== undefined)
    body.push(renderCusumPanel(cusumPanel, input.cusum, px, timeAxis));

  const horizontal = (value: number, style: RuleStyle, label: string): string =>
    horizontalRule(
      panel,
      py(value),
      { ...style, data: { 'data-value': String(value) } },
      element('title', {}, escapeText(label)),
    );
  // A limit on both sides of the centre line; `sign` is the sign its hover text starts with.
  const bothSides = (offset: number, style: RuleStyle, label: (sign: '+' | '-') => string): string[] => [
    horizontal(c + offset, style, label('+')),
    horizontal(c - offset, style, label('-')),
  ];
  const toleranceStyle: RuleStyle = { className: 'tolerance-line', colour: ALERT, width: 2 };
  const lines = [
    horizontal(
      c,
      { className: 'centre-line', colour: INK, width: 1 },
      `certified value ${formatNumber(c, 4)} %`,
    ),
    ...bothSides(
      input.tolerancePct,
      toleranceStyle,
      (sign) => `tolerance ${sign}${significantDigits(input.tolerancePct, 3)} %`,
    ),
    ...bothSides(
      2 * input.sigmaPct,
      { className: 'warning-line', ...warningStyle, width: 1.3 },
      (sign) => `${sign}2σ warning limit (${input.sigmaSource})`,
    ),
    ...bothSides(
      3 * input.sigmaPct,
      { className: 'action-line', ...actionStyle, width: 1.3 },
      (sign) => `${sign}3σ action limit (${input.sigmaSource})`,
    ),
  ];
  body.push(element('g', { class: 'limits', 'clip-path': `url(#${clip})` }, lines.join('')));

  if (input.trend !== undefined) {
    const trend = input.trend;
    const origin = timeOf(trend.originTime, 'trend.originTime');
    const at = (t: number): number => trend.interceptPct + (trend.slopePctPerDay * (t - origin)) / DAY_MS;
    const from = timeOf(trend.fittedFrom, 'trend.fittedFrom');
    const to = timeOf(trend.fittedTo, 'trend.fittedTo');
    const until = timeOf(trend.projectUntil, 'trend.projectUntil');
    const segment = line<number>()
      .x((t) => px(t))
      .y((t) => py(at(t)))
      .digits(2);
    const parts = [
      element('path', {
        class: 'trend-line',
        d: segment([from, to]) ?? '',
        fill: 'none',
        stroke: trendStyle.colour,
        'stroke-width': 2,
      }),
    ];
    if (until > to)
      parts.push(
        element('path', {
          class: 'trend-projection',
          d: segment([to, until]) ?? '',
          fill: 'none',
          stroke: trendStyle.colour,
          'stroke-width': 2,
          'stroke-dasharray': '3 3',
        }),
      );
    body.push(element('g', { class: 'trend', 'clip-path': `url(#${clip})` }, parts.join('')));
    if (trend.leavesToleranceAt !== undefined && trend.leavesToleranceAt !== null) {
      const leaves = timeOf(trend.leavesToleranceAt, 'trend.leavesToleranceAt');
      const lx = px(leaves);
      const ly = py(at(leaves));
      const text = `projected trend leaves the tolerance on ${new Date(leaves).toISOString().slice(0, 10)}`;
      body.push(
        element(
          'g',
          { class: 'leaves-tolerance', 'data-time': new Date(leaves).toISOString() },
          element(
            'path',
            {
              d: markerPath(symbolDiamond, 70),
              transform: translate(lx, ly),
              fill: '#ffffff',
              stroke: trendStyle.colour,
              'stroke-width': 1.6,
            },
            element('title', {}, escapeText(text)),
          ),
        ),
      );
      footnotes.push(text);
    }
  }

  const marks: string[] = [];
  let violations = 0;
  for (const record of records) {
    const cx = px(record.at);
    const cy = py(record.recoveryPct);
    const shape =
      record.verdict === 'fail' ? symbolCross : record.verdict === 'warning' ? symbolTriangle : symbolCircle;
    const colour =
      record.verdict === 'fail' ? ALERT : record.verdict === 'warning' ? seriesStyle(1).colour : INK;
    const hover =
      `${record.time}: recovery ${formatNumber(record.recoveryPct, 4)} %, ${record.verdict}` +
      `${record.rules.length > 0 ? `, rules ${record.rules.join(', ')}` : ''}` +
      `${record.label === undefined ? '' : ` (${record.label})`}`;
    if (record.rules.length > 0) {
      marks.push(
        element('circle', {
          class: 'rule-violation',
          cx,
          cy,
          r: 8,
          fill: 'none',
          stroke: colour,
          'stroke-width': 1.4,
        }),
      );
      // Labels sit in a strip above the panel, in two alternating rows, so they never cover data
      // and neighbouring checks' labels do not run into each other; a dotted leader joins label and check.
      const row = violations++ % 2;
      const labelY = panel.top - 8 - 13 * row;
      marks.push(
        element('line', {
          class: 'rule-leader',
          x1: cx,
          x2: cx,
          y1: labelY + 3,
          y2: cy - 8,
          stroke: colour,
          'stroke-width': 0.6,
          'stroke-dasharray': '1 2',
        }),
      );
      marks.push(
        element(
          'text',
          { class: 'rule-label', x: cx, y: labelY, 'text-anchor': 'middle', 'font-size': 10, fill: colour },
          escapeText(record.rules.join(' ')),
        ),
      );
    }
    marks.push(
      element(
        'path',
        {
          class: 'check',
          'data-verdict': record.verdict,
          'data-recovery': String(record.recoveryPct),
          'data-time': record.time,
          d: markerPath(shape, record.verdict === 'pass' ? 42 : 64),
          transform: translate(cx, cy),
          fill: colour,
          stroke: '#ffffff',
          'stroke-width': 0.8,
        },
        element('title', {}, escapeText(hover)),
      ),
    );
  }
  body.push(element('g', { class: 'checks' }, marks.join('')));
  if (input.nextDue !== undefined) {
    const dx = px(timeOf(input.nextDue, 'nextDue'));
    body.push(
      element(
        'g',
        { class: 'next-due' },
        verticalRule(panel, dx, { colour: MUTED, width: 1, dash: '1 3' }) +
          element(
            'text',
            { x: dx, y: panel.top + 12, 'text-anchor': 'middle', 'font-size': 10, fill: MUTED },
            'next due',
          ),
      ),
    );
  }
  if (records.length === 0) body.push(noteText(panel.left + 10, panel.top + 20, 'no rechecks recorded yet'));
  const noteLines = [...sigmaLines.filter((l) => l !== ''), ...footnotes];
  body.push(...notesBelow(lowest, noteLines, { gap: 10, lineHeight: 14 }));
  body.push(legend.svg);

  const fired = records.filter((r) => r.rules.length > 0).length;
  return svgDocument({
    id,
    kind: 'plot-control-chart',
    width,
    height,
    title: input.title ?? 'Check-standard recoveries',
    description:
      `${records.length} checks against tolerance ±${significantDigits(input.tolerancePct, 3)} % ` +
      `and ±2σ/±3σ limits with σ = ${significantDigits(input.sigmaPct, 3)} %; ` +
      `${fired} with a control rule fired` +
      `${
        input.trend === undefined
          ? ''
          : `; trend ${formatNumber(input.trend.slopePctPerDay * 7, 3)} % per week`
      }${
        input.cusum === undefined
          ? ''
          : `; CUSUM with k = ${significantDigits(input.cusum.k, 3)}σ and h = ${significantDigits(input.cusum.h, 3)}σ, ` +
            `${input.cusum.points.filter((p) => p.signal !== null).length} checks with a signal`
      }.`,
    defs,
    body: body.join(''),
  });
}
