/**
 * Colours, dash patterns, marker shapes and type sizes of every plot.
 *
 * The series colours were chosen for this project (DEVELOPERS.md "Plots" says how): a greedy
 * search over sRGB colours for the set whose smallest pairwise CIELAB ΔE*ab stays large in normal
 * vision and in simulated protanopia, deuteranopia and tritanopia (Machado, Oliveira and Fernandes
 * 2009, severity 1), restricted to colours with at least 3:1 contrast against white (WCAG 2.1
 * §1.4.11, non-text contrast), then ordered so the first few are the most distinct. A test
 * checks both properties. Because colour alone must never carry meaning (print in greyscale,
 * monochrome copiers), each series index also has its own dash pattern and marker shape.
 */
import {
  symbolCircle,
  symbolCross,
  symbolDiamond,
  symbolSquare,
  symbolStar,
  symbolTriangle,
  symbolWye,
  type SymbolType,
} from 'd3-shape';

/** Series colours, in order of use. */
export const SERIES_COLOURS: readonly string[] = [
  '#1f4e9c',
  '#cc5500',
  '#8811ff',
  '#889966',
  '#3399bb',
  '#664444',
  '#cc66ff',
];

/** Ink for measured data, axes and text. */
export const INK = '#222222';
/** Grid lines and frames. */
export const GRID = '#d9d9d9';
/** Secondary text (tick labels, notes). */
export const MUTED = '#555555';
/** Fill of a band (integration) window. */
export const BAND_FILL = '#cc5500';
/** Fill of baseline windows and CLS regions. */
export const BASELINE_FILL = '#3399bb';
/** Fill of prediction bands (drawn with opacity). */
export const INTERVAL_FILL = '#1f4e9c';
/** Tolerance and failed checks. */
export const ALERT = '#b8001f';

/** Dash patterns (SVG `stroke-dasharray`), one per series index; the first is solid. */
export const SERIES_DASHES: readonly (string | undefined)[] = [
  undefined,
  '7 3',
  '2 2.5',
  '9 3 2 3',
  '4 4',
  '12 3',
  '2 2 6 2',
];

/** Marker shapes, one per series index (d3-shape symbol types). */
export const SERIES_SYMBOLS: readonly SymbolType[] = [
  symbolCircle,
  symbolSquare,
  symbolTriangle,
  symbolDiamond,
  symbolCross,
  symbolStar,
  symbolWye,
];

/** Names of the marker shapes, in the order of {@link SERIES_SYMBOLS} (for legends and tests). */
export const SYMBOL_NAMES: readonly string[] = [
  'circle',
  'square',
  'triangle',
  'diamond',
  'cross',
  'star',
  'wye',
];

/** How series number `index` is drawn: colour, dash and marker cycle together. */
export interface SeriesStyle {
  /** Stroke and marker colour. */
  colour: string;
  /** Dash pattern, or undefined for a solid line. */
  dash: string | undefined;
  /** Marker shape. */
  symbol: SymbolType;
  /** Marker shape name. */
  symbolName: string;
}

/**
 * The style of series number `index` (0-based). The first seven differ from each other in colour,
 * dash and marker; from the eighth on the colours repeat, but the dash and the marker cycle with a
 * shift per round of seven, so the first 49 series all have distinct combinations.
 *
 * @param index - series index, ≥ 0
 */
export function seriesStyle(index: number): SeriesStyle {
  const count = SERIES_COLOURS.length;
  const n = Math.max(0, Math.trunc(index));
  const round = Math.floor(n / count);
  const colour = n % count;
  const dash = (n + round) % count;
  const shape = (n + 2 * round) % count;
  return {
    colour: SERIES_COLOURS[colour] as string,
    dash: SERIES_DASHES[dash],
    symbol: SERIES_SYMBOLS[shape] as SymbolType,
    symbolName: SYMBOL_NAMES[shape] as string,
  };
}

/** Font stack of all plot text: installed sans-serif faces only, no web fonts. */
export const FONT_FAMILY = "system-ui, 'DejaVu Sans', 'Liberation Sans', Arial, sans-serif";

/** Tick label font size, px. */
export const TICK_FONT_SIZE = 11;
/** Axis label and panel title font size, px. */
export const LABEL_FONT_SIZE = 12;
/** Title font size, px. */
export const TITLE_FONT_SIZE = 14;
