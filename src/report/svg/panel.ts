/**
 * Panels: the plotting rectangles of a plot, where they sit, and what is drawn across them (the
 * frame a test or a style sheet finds the panel by, lines from edge to edge, shaded wavenumber
 * windows, the small title above a stacked panel).
 *
 * Every plot lays its panels out the same way: the margins below leave room on the left for tick
 * labels and the rotated axis label, and a residual panel sits {@link PANEL_GAP} under the panel
 * whose x axis it shares.
 */
import { element, escapeText } from './markup.js';
import { LABEL_FONT_SIZE, MUTED } from './palette.js';

/** A plotting rectangle in SVG user units. */
export interface Panel {
  /** Left edge. */
  left: number;
  /** Top edge. */
  top: number;
  /** Width. */
  width: number;
  /** Height. */
  height: number;
}

/** Margins around the panels of every plot (left: room for tick labels and the rotated axis label), px. */
export const PLOT_MARGIN = { left: 78, right: 20, bottom: 50 } as const;

/** Vertical gap between a panel and the panel stacked under it (tick labels, axis label, panel title), px. */
export const PANEL_GAP = 74;

/** Right edge of a panel. */
export function panelRight(panel: Panel): number {
  return panel.left + panel.width;
}

/** Bottom edge of a panel. */
export function panelBottom(panel: Panel): number {
  return panel.top + panel.height;
}

/**
 * The panel stacked under another with the same left edge and width, {@link PANEL_GAP} below it
 * (a residual panel under the panel whose x axis it repeats).
 *
 * @param above - the panel above
 * @param height - height of the new panel, px
 */
export function panelBelow(above: Panel, height: number): Panel {
  return { left: above.left, top: panelBottom(above) + PANEL_GAP, width: above.width, height };
}

/**
 * The invisible rectangle that marks a panel's place in the markup (class `panel-frame`), so
 * tests, readers and style sheets find the panel's geometry without parsing the axes.
 *
 * @param panel - the panel
 * @param name - `data-panel` value naming the panel in a plot of several (omitted for one panel)
 */
export function panelFrame(panel: Panel, name?: string): string {
  return element('rect', {
    class: 'panel-frame',
    'data-panel': name,
    x: panel.left,
    y: panel.top,
    width: panel.width,
    height: panel.height,
    fill: 'none',
    stroke: 'none',
  });
}

/**
 * The small title over the top-left corner of a panel, e.g. over a residual panel.
 *
 * @param panel - the panel
 * @param text - plain text (escaped here)
 */
export function panelTitle(panel: Panel, text: string): string {
  return element(
    'text',
    { class: 'panel-title', x: panel.left, y: panel.top - 8, 'font-size': LABEL_FONT_SIZE, fill: MUTED },
    escapeText(text),
  );
}

/** Stroke of a line drawn across or through a panel. */
export interface RuleStyle {
  /** Class of the line. */
  className?: string;
  /** `data-*` attributes, written after the class. */
  data?: Readonly<Record<string, string>>;
  /** Stroke colour. */
  colour: string;
  /** Stroke width, px. */
  width: number;
  /** Dash pattern (undefined: solid). */
  dash?: string | undefined;
}

/**
 * A straight line between two points.
 *
 * @param style - class, data attributes and stroke
 * @param ends - end points, px
 * @param children - inner markup (e.g. a `<title>`)
 */
export function lineSegment(
  style: RuleStyle,
  ends: { x1: number; x2: number; y1: number; y2: number },
  children?: string,
): string {
  return element(
    'line',
    {
      class: style.className,
      ...style.data,
      ...ends,
      stroke: style.colour,
      'stroke-width': style.width,
      'stroke-dasharray': style.dash,
    },
    children,
  );
}

/**
 * A horizontal line across a panel, from its left to its right edge.
 *
 * @param panel - the panel
 * @param y - height of the line, px
 * @param style - class, data attributes and stroke
 * @param children - inner markup (e.g. a `<title>`)
 */
export function horizontalRule(panel: Panel, y: number, style: RuleStyle, children?: string): string {
  return lineSegment(style, { x1: panel.left, x2: panelRight(panel), y1: y, y2: y }, children);
}

/**
 * A vertical line through a panel, from its top to its bottom edge.
 *
 * @param panel - the panel
 * @param x - position of the line, px
 * @param style - class, data attributes and stroke
 * @param children - inner markup (e.g. a `<title>`)
 */
export function verticalRule(panel: Panel, x: number, style: RuleStyle, children?: string): string {
  return lineSegment(style, { x1: x, x2: x, y1: panel.top, y2: panelBottom(panel) }, children);
}

/** How a wavenumber window is shaded. */
export interface WindowShade {
  /** Class of the rectangle, e.g. `band-window`. */
  className: string;
  /** Fill colour or `url(#pattern)`. */
  fill: string;
  /** Fill opacity (undefined: opaque, for a pattern). */
  opacity?: number | undefined;
  /** Stroke (undefined: the attribute is left out). */
  stroke?: string;
  /** Hover text (plain; escaped here). */
  label: string;
}

/**
 * A wavenumber window shaded over the full height of a panel, with `data-low` and `data-high` in
 * cm⁻¹ and its hover text.
 *
 * @param panel - the panel
 * @param window - [low, high], cm⁻¹
 * @param position - maps a wavenumber to a pixel along the x axis (either direction)
 * @param shade - class, fill and text
 */
export function windowRect(
  panel: Panel,
  window: readonly [number, number],
  position: (wavenumber: number) => number,
  shade: WindowShade,
): string {
  const a = position(window[0]);
  const b = position(window[1]);
  return element(
    'rect',
    {
      class: shade.className,
      'data-low': String(window[0]),
      'data-high': String(window[1]),
      x: Math.min(a, b),
      y: panel.top,
      width: Math.abs(b - a),
      height: panel.height,
      fill: shade.fill,
      'fill-opacity': shade.opacity,
      stroke: shade.stroke,
    },
    element('title', {}, escapeText(shade.label)),
  );
}
