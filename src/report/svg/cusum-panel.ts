/**
 * The CUSUM panel under the control chart: the tabular cumulative sums of check recoveries
 * (ISO 7870-4) against the same time axis, C⁺ drawn upwards and C⁻ downwards from zero, with the
 * decision interval ±h and the checks at which a sum passed it marked.
 */
import { line, symbolSquare, symbolTriangle } from 'd3-shape';
import { BandwrightError } from '../../errors.js';
import { significantDigits } from '../../words.js';
import { linearAxisScale, markerPath, panelAxes, type PanelAxisSpec } from './chart.js';
import { element, escapeText, translate } from './markup.js';
import { ALERT, INK, MUTED, seriesStyle } from './palette.js';
import { horizontalRule, panelFrame, panelTitle, type Panel } from './panel.js';

/** One check's sums. */
export interface CusumChartPoint {
  /** When the check was measured, ISO 8601. */
  time: string;
  /** C⁺ after the check, σ. */
  upper: number;
  /** C⁻ after the check, σ. */
  lower: number;
  /** `above`/`below` when a sum is beyond h at this check, else null. */
  signal: 'above' | 'below' | null;
}

/** The CUSUM chart's input: the settings and the sums of every span check. Plain data. */
export interface ControlChartCusum {
  /** Reference value k, σ. */
  k: number;
  /** Decision interval h, σ, > 0. */
  h: number;
  /** The sums per check, any order (drawn by time). */
  points: readonly CusumChartPoint[];
}

/** Height of the CUSUM panel, px. */
export const CUSUM_PANEL_HEIGHT = 130;

/**
 * Draws the CUSUM panel.
 *
 * Classes: `panel-frame` (`data-panel="cusum"`), `cusum-upper` and `cusum-lower` (the two sums as
 * lines), `cusum-point` markers (`data-upper`, `data-lower`, `data-time`, at
 * `transform="translate(x,y)"` on C⁺ above zero and −C⁻ below), `cusum-signal` marks,
 * `decision-line` (`data-value` ±h), `cusum-zero`, `panel-title`.
 *
 * @param panel - where to draw
 * @param input - k, h and the sums
 * @param time - the x position of a time, ms since the epoch (the control chart's time scale)
 * @param bottom - the time axis (ticks, positions, format, label) as the chart above draws it
 * @returns SVG markup
 * @throws BandwrightError `INVALID_VALUE` for h ≤ 0 or a sum that is not finite
 */
export function renderCusumPanel(
  panel: Panel,
  input: ControlChartCusum,
  time: (ms: number) => number,
  bottom: PanelAxisSpec,
): string {
  if (!(input.h > 0))
    throw new BandwrightError('INVALID_VALUE', `control chart: cusum.h = ${input.h}, must be > 0`, {
      parameter: 'cusum.h',
    });
  const points = input.points
    .map((p, i) => {
      if (!Number.isFinite(p.upper) || !Number.isFinite(p.lower))
        throw new BandwrightError(
          'INVALID_VALUE',
          `control chart: cusum.points[${i}] = (${p.upper}, ${p.lower}), must be finite sums`,
          { parameter: `cusum.points[${i}]` },
        );
      return { ...p, at: Date.parse(p.time) };
    })
    .filter((p) => Number.isFinite(p.at))
    .sort((a, b) => a.at - b.at);
  const top = Math.max(input.h, ...points.map((p) => p.upper)) * 1.15;
  const bottomValue = -Math.max(input.h, ...points.map((p) => p.lower)) * 1.15;
  const y = linearAxisScale([bottomValue, top], [panel.top + panel.height, panel.top], { tickCount: 4 });
  const py = (v: number): number => y.scale(v);
  const upperStyle = seriesStyle(0);
  const lowerStyle = seriesStyle(2);
  const path = (values: readonly { at: number; v: number }[]): string =>
    line<{ at: number; v: number }>()
      .x((p) => time(p.at))
      .y((p) => py(p.v))
      .digits(2)(values) ?? '';
  const h = significantDigits(input.h, 3);
  const parts: string[] = [
    panelFrame(panel, 'cusum'),
    panelTitle(
      panel,
      `CUSUM of (recovery − 100 %)/σ: C⁺ up, C⁻ down; k = ${significantDigits(input.k, 3)}σ, decision interval h = ${h}σ`,
    ),
    panelAxes(panel, bottom, { ticks: y.ticks, position: py, format: y.format, label: 'sum / σ' }),
    horizontalRule(panel, py(0), { className: 'cusum-zero', colour: INK, width: 1 }),
    horizontalRule(
      panel,
      py(input.h),
      {
        className: 'decision-line',
        data: { 'data-value': String(input.h) },
        colour: ALERT,
        width: 1.3,
        dash: '6 3',
      },
      element('title', {}, escapeText(`decision interval +h = +${h}σ: C⁺ above it signals a drift high`)),
    ),
    horizontalRule(
      panel,
      py(-input.h),
      {
        className: 'decision-line',
        data: { 'data-value': String(-input.h) },
        colour: ALERT,
        width: 1.3,
        dash: '6 3',
      },
      element('title', {}, escapeText(`decision interval −h = −${h}σ: C⁻ beyond it signals a drift low`)),
    ),
  ];
  if (points.length > 0) {
    parts.push(
      element('path', {
        class: 'cusum-upper',
        d: path(points.map((p) => ({ at: p.at, v: p.upper }))),
        fill: 'none',
        stroke: upperStyle.colour,
        'stroke-width': 1.6,
      }),
      element('path', {
        class: 'cusum-lower',
        d: path(points.map((p) => ({ at: p.at, v: -p.lower }))),
        fill: 'none',
        stroke: lowerStyle.colour,
        'stroke-width': 1.6,
        'stroke-dasharray': '5 2',
      }),
    );
  }
  for (const p of points) {
    const x = time(p.at);
    const hover = `${p.time}: C⁺ = ${p.upper.toFixed(2)}σ, C⁻ = ${p.lower.toFixed(2)}σ${
      p.signal === null ? '' : `, signal: drifting ${p.signal === 'below' ? 'low' : 'high'}`
    }`;
    const attributes = {
      class: 'cusum-point',
      'data-upper': String(p.upper),
      'data-lower': String(p.lower),
      'data-time': p.time,
    };
    parts.push(
      element(
        'path',
        {
          ...attributes,
          d: markerPath(symbolSquare, 18),
          transform: translate(x, py(p.upper)),
          fill: upperStyle.colour,
        },
        element('title', {}, escapeText(hover)),
      ),
      element('path', {
        ...attributes,
        d: markerPath(symbolSquare, 18),
        transform: translate(x, py(-p.lower)),
        fill: lowerStyle.colour,
      }),
    );
    if (p.signal !== null) {
      const value = p.signal === 'below' ? -p.lower : p.upper;
      parts.push(
        element(
          'path',
          {
            class: 'cusum-signal',
            'data-signal': p.signal,
            'data-time': p.time,
            d: markerPath(symbolTriangle, 70),
            transform: `${translate(x, py(value))}${p.signal === 'below' ? ' rotate(180)' : ''}`,
            fill: 'none',
            stroke: ALERT,
            'stroke-width': 1.4,
          },
          element('title', {}, escapeText(hover)),
        ),
      );
    }
  }
  if (points.length === 0)
    parts.push(
      element('text', { x: panel.left + 10, y: panel.top + 20, 'font-size': 11, fill: MUTED }, 'no sums yet'),
    );
  return element('g', { class: 'cusum-panel' }, parts.join(''));
}
