/**
 * The parts every plot is made of: the document element, the layout of legend and panels (the
 * panels themselves are in `panel.ts`), axes with ticks, grid and a label that names the quantity
 * and its unit, wavenumber axes, legends, notes, markers and clip paths. Everything is returned as
 * SVG text; text is real `<text>` elements so it can be selected, searched and read by screen
 * readers, and stays sharp when printed.
 *
 * Coordinates are in user units equal to CSS pixels at the plot's natural size (the `width` and
 * `height` attributes equal the `viewBox`).
 */
import { scaleLinear, type ScaleLinear } from 'd3-scale';
import { symbol, type SymbolType } from 'd3-shape';
import { BandwrightError } from '../../errors.js';
import { coordinate, element, escapeText, plainMinus } from './markup.js';
import {
  FONT_FAMILY,
  GRID,
  INK,
  LABEL_FONT_SIZE,
  MUTED,
  TICK_FONT_SIZE,
  TITLE_FONT_SIZE,
} from './palette.js';
import {
  horizontalRule,
  lineSegment,
  panelBottom,
  PLOT_MARGIN,
  verticalRule,
  type Panel,
  type RuleStyle,
} from './panel.js';

/** Axis options shared by {@link renderAxis} callers. */
export interface AxisSpec {
  /** Where the axis sits. */
  side: 'bottom' | 'left';
  /** Tick positions in data units. */
  ticks: readonly number[];
  /** Maps a data value to a pixel along the axis. */
  position: (value: number) => number;
  /** Tick label text (plain text; escaped here). */
  format: (value: number) => string;
  /** Axis label naming the quantity and its unit, e.g. `wavenumber / cm⁻¹`. */
  label: string;
  /** Draw grid lines across the panel at each tick (default true). */
  grid?: boolean;
  /** CSS-like class of the axis group, added to `axis axis-x|axis-y`. */
  className?: string;
  /** Leave tick labels out (for a panel stacked above another with the same x axis). */
  hideTickLabels?: boolean;
}

const DOMAIN_STYLE: RuleStyle = { className: 'domain', colour: INK, width: 1 };
const GRID_STYLE: RuleStyle = { className: 'grid', colour: GRID, width: 0.6 };
const TICK_STYLE: RuleStyle = { className: 'tick', colour: INK, width: 1 };

/**
 * Renders an axis with ticks, tick labels, optional grid lines and its label.
 *
 * @param panel - the panel the axis belongs to
 * @param spec - side, ticks and label
 * @returns an SVG `<g class="axis …">`
 */
export function renderAxis(panel: Panel, spec: AxisSpec): string {
  const grid = spec.grid ?? true;
  const bottom = panelBottom(panel);
  const horizontal = spec.side === 'bottom';
  const parts: string[] = [
    horizontal ? horizontalRule(panel, bottom, DOMAIN_STYLE) : verticalRule(panel, panel.left, DOMAIN_STYLE),
  ];
  for (const value of spec.ticks) {
    const at = spec.position(value);
    if (grid)
      parts.push(horizontal ? verticalRule(panel, at, GRID_STYLE) : horizontalRule(panel, at, GRID_STYLE));
    parts.push(
      horizontal
        ? lineSegment(TICK_STYLE, { x1: at, x2: at, y1: bottom, y2: bottom + 5 })
        : lineSegment(TICK_STYLE, { x1: panel.left - 5, x2: panel.left, y1: at, y2: at }),
    );
    if (!spec.hideTickLabels) {
      const place = horizontal
        ? { x: at, y: bottom + 8 + TICK_FONT_SIZE * 0.8, 'text-anchor': 'middle' }
        : { x: panel.left - 8, y: at + TICK_FONT_SIZE * 0.35, 'text-anchor': 'end' };
      parts.push(
        element(
          'text',
          { class: 'tick-label', ...place, 'font-size': TICK_FONT_SIZE, fill: MUTED },
          escapeText(spec.format(value)),
        ),
      );
    }
  }
  if (spec.label !== '') {
    // The left axis label is turned to run up the side of the panel, centred on it.
    const x = horizontal ? panel.left + panel.width / 2 : panel.left - 54;
    const y = horizontal ? bottom + (spec.hideTickLabels ? 18 : 36) : panel.top + panel.height / 2;
    parts.push(
      element(
        'text',
        {
          class: 'axis-label',
          x,
          y,
          transform: horizontal ? undefined : `rotate(-90 ${coordinate(x)} ${coordinate(y)})`,
          'text-anchor': 'middle',
          'font-size': LABEL_FONT_SIZE,
          fill: INK,
        },
        escapeText(spec.label),
      ),
    );
  }
  const sideClass = horizontal ? 'axis axis-x' : 'axis axis-y';
  const axisClass = spec.className === undefined ? sideClass : `${sideClass} ${spec.className}`;
  return element('g', { class: axisClass }, parts.join(''));
}

/** A linear scale with its ticks, ready for {@link renderAxis}. */
export interface LinearAxisScale {
  /** The d3 scale (domain in data units, range in pixels). */
  scale: ScaleLinear<number, number>;
  /** Tick values. */
  ticks: number[];
  /** Tick label formatter (ASCII minus). */
  format: (value: number) => string;
}

/**
 * A linear scale from a data domain onto a pixel range, with readable ticks.
 *
 * @param domain - [from, to] in data units; `to` < `from` is allowed (reversed axis)
 * @param range - [start, end] in pixels
 * @param options - `tickCount` (default 6), `nice` to round the domain outwards to ticks (default true)
 * @returns the scale, its ticks and a formatter
 * @throws BandwrightError `INVALID_VALUE` for a non-finite domain
 */
export function linearAxisScale(
  domain: readonly [number, number],
  range: readonly [number, number],
  options: { tickCount?: number; nice?: boolean } = {},
): LinearAxisScale {
  const tickCount = options.tickCount ?? 6;
  let [from, to] = domain;
  if (!Number.isFinite(from) || !Number.isFinite(to)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `plot axis domain = [${from}, ${to}], must be two finite numbers`,
      { parameter: 'domain' },
    );
  }
  if (from === to) {
    // A flat series still needs an axis: open a window around the single value.
    const pad = from === 0 ? 1 : Math.abs(from) * 0.05;
    from -= pad;
    to += pad;
  }
  const scale = scaleLinear().domain([from, to]).range([range[0], range[1]]);
  if (options.nice ?? true) scale.nice(tickCount);
  const d3Format = scale.tickFormat(tickCount);
  return { scale, ticks: scale.ticks(tickCount), format: (value: number) => plainMinus(d3Format(value)) };
}

/**
 * Extent of finite values over several series, padded by a fraction of the span.
 *
 * @param series - arrays of values (non-finite values are skipped)
 * @param options - `pad` fraction of the span added at each end (default 0.05), `include` values that
 *   must lie inside (e.g. 0)
 * @returns [low, high]; [0, 1] when there is no finite value
 */
export function paddedExtent(
  series: readonly ArrayLike<number>[],
  options: { pad?: number; include?: readonly number[] } = {},
): [number, number] {
  let low = Number.POSITIVE_INFINITY;
  let high = Number.NEGATIVE_INFINITY;
  const visit = (value: number): void => {
    if (!Number.isFinite(value)) return;
    if (value < low) low = value;
    if (value > high) high = value;
  };
  for (const values of series) for (let i = 0; i < values.length; i++) visit(values[i] as number);
  for (const value of options.include ?? []) visit(value);
  if (low > high) return [0, 1];
  const pad = (high - low) * (options.pad ?? 0.05);
  return [low - pad, high + pad];
}

/**
 * A marker path centred on (0, 0), to be placed with `transform="translate(x,y)"`.
 *
 * @param shape - d3 symbol type
 * @param size - area in square pixels (default 42: about 7 px across)
 */
export function markerPath(shape: SymbolType, size = 42): string {
  return symbol(shape, size).digits(2)() ?? '';
}

/** What a legend entry shows beside its text. */
export interface LegendEntry {
  /** Text (escaped here). */
  label: string;
  /** Colour. */
  colour: string;
  /** Line sample with this dash (undefined: solid); leave `line` false for a marker or area only. */
  dash?: string | undefined;
  /** Show a line sample. */
  line?: boolean;
  /** Line width of the sample (default 1.6). */
  lineWidth?: number;
  /** Show a marker of this shape. */
  marker?: SymbolType;
  /** Marker drawn hollow (white fill). */
  hollow?: boolean;
  /** Show a filled box (for bands and windows) with this opacity. */
  area?: number;
  /** Fill pattern id for the box (hatched windows), used instead of a plain fill. */
  pattern?: string;
}

/** Height of one legend row, px. */
export const LEGEND_ROW = 16;

/**
 * Renders a legend in rows at a position, laid out in as many columns as fit in `width`.
 *
 * @param entries - legend entries
 * @param at - top-left corner and available width
 * @returns an SVG `<g class="legend">` and its height in px
 */
export function renderLegend(
  entries: readonly LegendEntry[],
  at: { x: number; y: number; width: number },
): { svg: string; height: number } {
  if (entries.length === 0) return { svg: '', height: 0 };
  // Approximate text width (6.2 px per character at 11 px) to lay out columns without measuring.
  const itemWidth = Math.min(at.width, Math.max(...entries.map((e) => 34 + 6.2 * [...e.label].length)) + 14);
  const columns = Math.max(1, Math.floor(at.width / itemWidth));
  const parts = entries.map((entry, i) => {
    const x = at.x + (i % columns) * itemWidth;
    const y = at.y + Math.floor(i / columns) * LEGEND_ROW + LEGEND_ROW / 2;
    const sample: string[] = [];
    if (entry.area !== undefined) {
      sample.push(
        element('rect', {
          x,
          y: y - 5,
          width: 24,
          height: 10,
          fill: entry.pattern === undefined ? entry.colour : `url(#${entry.pattern})`,
          'fill-opacity': entry.pattern === undefined ? entry.area : undefined,
          stroke: entry.colour,
          'stroke-width': 0.6,
        }),
      );
    }
    if (entry.line) {
      sample.push(
        element('line', {
          x1: x,
          x2: x + 24,
          y1: y,
          y2: y,
          stroke: entry.colour,
          'stroke-width': entry.lineWidth ?? 1.6,
          'stroke-dasharray': entry.dash,
        }),
      );
    }
    if (entry.marker !== undefined) {
      sample.push(
        element('path', {
          d: markerPath(entry.marker),
          transform: `translate(${coordinate(x + 12)},${coordinate(y)})`,
          fill: entry.hollow ? '#ffffff' : entry.colour,
          stroke: entry.colour,
          'stroke-width': 1.2,
        }),
      );
    }
    const text = element(
      'text',
      { x: x + 30, y: y + 4, 'font-size': TICK_FONT_SIZE, fill: INK },
      escapeText(entry.label),
    );
    return element('g', { class: 'legend-entry' }, sample.join('') + text);
  });
  return {
    svg: element('g', { class: 'legend' }, parts.join('')),
    height: Math.ceil(entries.length / columns) * LEGEND_ROW,
  };
}

/** Options every plot takes besides its own. */
export interface PlotOptions {
  /** Unique id of the plot in its document, the prefix of every id inside it (default: the plot's kind). */
  id?: string;
  /** Width, px (default 720). */
  width?: number;
}

/** Top of the legend, under the plot title, px. */
const LEGEND_TOP = 28;

/**
 * The top of a plot: the legend under the title, across the width inside the margins, and the
 * first panel under the legend.
 *
 * @param entries - legend entries
 * @param layout - `width` of the plot, `panelHeight` and the `gap` between legend and panel (default 10), px
 * @returns the legend (markup and height) and the panel
 */
export function legendAndPanel(
  entries: readonly LegendEntry[],
  layout: { width: number; panelHeight: number; gap?: number },
): { legend: { svg: string; height: number }; panel: Panel } {
  const width = layout.width - PLOT_MARGIN.left - PLOT_MARGIN.right;
  const legend = renderLegend(entries, { x: PLOT_MARGIN.left, y: LEGEND_TOP, width });
  return {
    legend,
    panel: {
      left: PLOT_MARGIN.left,
      top: LEGEND_TOP + legend.height + (layout.gap ?? 10),
      width,
      height: layout.panelHeight,
    },
  };
}

/** An axis of {@link panelAxes}: an {@link AxisSpec} without its side. */
export type PanelAxisSpec = Omit<AxisSpec, 'side'>;

/**
 * The bottom and the left axis of a panel, in that order.
 *
 * @param panel - the panel
 * @param bottom - the x axis
 * @param left - the y axis
 * @returns two `<g class="axis …">` elements
 */
export function panelAxes(panel: Panel, bottom: PanelAxisSpec, left: PanelAxisSpec): string {
  return renderAxis(panel, { side: 'bottom', ...bottom }) + renderAxis(panel, { side: 'left', ...left });
}

/** Distance between the baselines of notes under a plot, px. */
export const NOTE_LINE_HEIGHT = 15;

/**
 * Notes in lines under a panel's x axis (the plot's height must leave room for them).
 *
 * @param panel - the lowest panel of the plot
 * @param notes - plain text, one line each
 * @param spacing - `gap` under the bottom margin to the first baseline (default 4) and `lineHeight`
 *   (default {@link NOTE_LINE_HEIGHT}), px
 * @returns one `plot-note` text element per note
 */
export function notesBelow(
  panel: Panel,
  notes: readonly string[],
  spacing: { gap: number; lineHeight: number } = { gap: 4, lineHeight: NOTE_LINE_HEIGHT },
): string[] {
  const top = panelBottom(panel) + PLOT_MARGIN.bottom + spacing.gap;
  return notes.map((note, i) => noteText(panel.left, top + i * spacing.lineHeight, note));
}

/** Direction of a wavenumber axis. */
export type WavenumberAxis = 'descending' | 'ascending';

/**
 * A wavenumber axis over a panel's width: high wavenumbers on the left for `descending` (the usual
 * infrared layout), 8 ticks, the range used as given.
 *
 * @param range - [low, high], cm⁻¹
 * @param panel - the panel
 * @param direction - axis direction
 */
export function wavenumberScale(
  range: readonly [number, number],
  panel: Panel,
  direction: WavenumberAxis,
): LinearAxisScale {
  return linearAxisScale(
    direction === 'descending' ? [range[1], range[0]] : range,
    [panel.left, panel.left + panel.width],
    { nice: false, tickCount: 8 },
  );
}

/**
 * The label of a wavenumber axis, saying which way it runs.
 *
 * @param direction - axis direction
 */
export function wavenumberAxisLabel(direction: WavenumberAxis): string {
  return `wavenumber / cm⁻¹ (${direction === 'descending' ? 'decreasing to the right' : 'increasing to the right'})`;
}

/**
 * A clip path for a panel, so curves and bands never spill over the axes.
 *
 * @param id - unique id in the document
 * @param panel - the panel
 */
export function clipPath(id: string, panel: Panel): string {
  return element(
    'clipPath',
    { id },
    element('rect', { x: panel.left, y: panel.top, width: panel.width, height: panel.height }),
  );
}

/** What {@link svgDocument} wraps. */
export interface SvgDocumentSpec {
  /** Width, px. */
  width: number;
  /** Height, px. */
  height: number;
  /** Unique id of the plot (prefix of every id inside it). */
  id: string;
  /** Title shown at the top and given to assistive technology. */
  title: string;
  /** A sentence describing the plot for assistive technology. */
  description: string;
  /** `plot-…` class naming the kind of plot. */
  kind: string;
  /** Inner markup. */
  body: string;
  /** `<defs>` content (clip paths, patterns). */
  defs?: string;
}

/**
 * The `<svg>` element of a plot: namespace, size, accessible title and description, white
 * background, the visible title, then the body.
 *
 * @param spec - size, ids, texts, body
 * @returns SVG markup usable as a file (after an XML declaration) or inline in HTML
 */
export function svgDocument(spec: SvgDocumentSpec): string {
  const titleId = `${spec.id}-title`;
  const descriptionId = `${spec.id}-description`;
  return element(
    'svg',
    {
      xmlns: 'http://www.w3.org/2000/svg',
      id: spec.id,
      class: `plot ${spec.kind}`,
      width: spec.width,
      height: spec.height,
      viewBox: `0 0 ${coordinate(spec.width)} ${coordinate(spec.height)}`,
      role: 'img',
      'aria-labelledby': `${titleId} ${descriptionId}`,
      'font-family': FONT_FAMILY,
    },
    [
      element('title', { id: titleId }, escapeText(spec.title)),
      element('desc', { id: descriptionId }, escapeText(spec.description)),
      spec.defs === undefined || spec.defs === '' ? '' : element('defs', {}, spec.defs),
      element('rect', {
        class: 'background',
        x: 0,
        y: 0,
        width: spec.width,
        height: spec.height,
        fill: '#ffffff',
      }),
      element(
        'text',
        { class: 'plot-title', x: 12, y: 20, 'font-size': TITLE_FONT_SIZE, 'font-weight': 'bold', fill: INK },
        escapeText(spec.title),
      ),
      spec.body,
    ].join(''),
  );
}

/**
 * A standalone SVG file: XML declaration, then the plot.
 *
 * @param svg - markup from a render function
 */
export function svgFile(svg: string): string {
  return `<?xml version="1.0" encoding="UTF-8"?>\n${svg}\n`;
}

/**
 * A hatch pattern (diagonal lines), for windows that must stay distinguishable in greyscale.
 *
 * @param id - unique id
 * @param colour - line colour
 */
export function hatchPattern(id: string, colour: string): string {
  return element(
    'pattern',
    { id, width: 6, height: 6, patternUnits: 'userSpaceOnUse', patternTransform: 'rotate(45)' },
    element('rect', { width: 6, height: 6, fill: colour, 'fill-opacity': 0.08 }) +
      element('line', {
        x1: 0,
        y1: 0,
        x2: 0,
        y2: 6,
        stroke: colour,
        'stroke-width': 2,
        'stroke-opacity': 0.45,
      }),
  );
}

/**
 * A note line in small muted text (e.g. "3 standard scans could not be read").
 *
 * @param x - left, px
 * @param y - baseline, px
 * @param text - plain text (escaped here)
 */
export function noteText(x: number, y: number, text: string): string {
  return element(
    'text',
    { class: 'plot-note', x, y, 'font-size': TICK_FONT_SIZE, fill: MUTED },
    escapeText(text),
  );
}
