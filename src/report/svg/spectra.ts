/**
 * Spectra plot: absorbance spectra overlaid over a wavenumber range, the band (integration)
 * window shaded, the baseline windows hatched, and the fitted baseline of each spectrum drawn
 * across the band, so a reader sees what was integrated and what was taken as baseline.
 *
 * Used for the standards of a calibration (grouped by certified concentration: replicates share a
 * style) and for a single sample in a quantification report. Long spectra are thinned for drawing
 * by keeping the lowest and highest point in every pixel column, which keeps every peak and
 * trough visible at the plot's resolution.
 */
import { line } from 'd3-shape';
import { evaluateBaseline, fitBaseline } from '../../bands/band.js';
import type { Window } from '../../bands/windows.js';
import type { Calibration, GasCalibration } from '../../calibration/calibration.js';
import { formatWindow } from '../../bands/windows.js';
import { unitLabel } from '../../gas/units.js';
import { toAbsorbance, type Spectrum } from '../../spectrum/spectrum.js';
import { formatNumber } from '../table.js';
import {
  clipPath,
  hatchPattern,
  legendAndPanel,
  linearAxisScale,
  NOTE_LINE_HEIGHT,
  notesBelow,
  noteText,
  paddedExtent,
  panelAxes,
  svgDocument,
  wavenumberAxisLabel,
  wavenumberScale,
  type LegendEntry,
  type PlotOptions,
  type WavenumberAxis,
} from './chart.js';
import { element, escapeText } from './markup.js';
import { BAND_FILL, BASELINE_FILL, MUTED, seriesStyle } from './palette.js';
import { panelBottom, panelFrame, PLOT_MARGIN, windowRect } from './panel.js';

/** One spectrum to draw. */
export interface SpectrumSeries {
  /** Name shown on hover (scan name). */
  label: string;
  /** Wavenumbers, cm⁻¹, ascending. */
  x: ArrayLike<number>;
  /** Absorbance (decadic), same length. */
  y: ArrayLike<number>;
  /** Legend group: series with the same group share colour, dash and legend entry (default: own label). */
  group?: string;
}

/** A fitted baseline drawn under a spectrum. */
export interface BaselineSeries {
  /** Index of the spectrum in {@link SpectraPlotInput.series} it belongs to (sets its colour). */
  series: number;
  /** Wavenumbers, cm⁻¹. */
  x: readonly number[];
  /** Baseline absorbance at each. */
  y: readonly number[];
}

/** Everything the spectra plot draws. Plain data. */
export interface SpectraPlotInput {
  /** Title (plain text). */
  title: string;
  /** Spectra in drawing order. */
  series: readonly SpectrumSeries[];
  /** Integration window, cm⁻¹, shaded. */
  band?: Window;
  /** Baseline windows, cm⁻¹, hatched. */
  baselineWindows: readonly Window[];
  /** Fit regions of a classical-least-squares method, cm⁻¹, shaded lightly. */
  regions?: readonly Window[];
  /** Fitted baselines. */
  baselines: readonly BaselineSeries[];
  /** Absorbance axis label. */
  yLabel?: string;
  /** Notes printed under the plot (e.g. spectra that could not be read). */
  notes?: readonly string[];
}

/** Size and axis options of {@link renderSpectra} (default id `spectra`). */
export interface SpectraOptions extends PlotOptions {
  /** Panel height, px (default 300). */
  panelHeight?: number;
  /**
   * Wavenumber axis direction: `descending` (high wavenumbers on the left, the usual IR layout;
   * default) or `ascending`.
   */
  wavenumberAxis?: WavenumberAxis;
  /** Wavenumber range to show [low, high], cm⁻¹ (default: the windows with a margin, else the data). */
  range?: readonly [number, number];
  /** Absorbance axis [bottom, top], used as given (default: the data in range, rounded outwards). */
  absorbanceDomain?: readonly [number, number];
}

export type { WavenumberAxis } from './chart.js';

/**
 * Index range [first, end) of the points of ascending `x` inside [low, high], widened by one point
 * on each side so lines run to the panel's edge (the clip path trims them).
 */
function visibleIndices(x: ArrayLike<number>, low: number, high: number): [number, number] {
  let first = 0;
  while (first < x.length && (x[first] as number) < low) first++;
  let end = x.length;
  while (end > first && (x[end - 1] as number) > high) end--;
  return [Math.max(0, first - 1), Math.min(x.length, end + 1)];
}

/**
 * Thins a spectrum for drawing: inside each of `columns` equal slices of [low, high], keeps the
 * lowest and the highest point (in their x order). Series with fewer than 2 points per column are
 * returned whole.
 *
 * @param x - ascending wavenumbers
 * @param y - values
 * @param low - visible range low end, cm⁻¹
 * @param high - visible range high end, cm⁻¹
 * @param columns - pixel columns (≥ 1)
 * @returns the points to draw, ascending in x
 */
export function thinForDrawing(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  low: number,
  high: number,
  columns: number,
): { x: number[]; y: number[] } {
  const [first, end] = visibleIndices(x, low, high);
  const outX: number[] = [];
  const outY: number[] = [];
  if (end - first <= 2 * columns) {
    for (let i = first; i < end; i++) {
      outX.push(x[i] as number);
      outY.push(y[i] as number);
    }
    return { x: outX, y: outY };
  }
  const width = (high - low) / columns;
  let i = first;
  while (i < end) {
    const column = Math.floor(((x[i] as number) - low) / width);
    let minIndex = i;
    let maxIndex = i;
    let j = i;
    while (j < end && Math.floor(((x[j] as number) - low) / width) === column) {
      if ((y[j] as number) < (y[minIndex] as number)) minIndex = j;
      if ((y[j] as number) > (y[maxIndex] as number)) maxIndex = j;
      j++;
    }
    const pair = minIndex <= maxIndex ? [minIndex, maxIndex] : [maxIndex, minIndex];
    for (const k of new Set(pair)) {
      outX.push(x[k] as number);
      outY.push(y[k] as number);
    }
    i = j;
  }
  return { x: outX, y: outY };
}

function windowSpan(band: Window | undefined, windows: readonly Window[]): [number, number] | undefined {
  const all = [...(band === undefined ? [] : [band]), ...windows];
  if (all.length === 0) return undefined;
  return [Math.min(...all.map((w) => w[0])), Math.max(...all.map((w) => w[1]))];
}

/**
 * Draws spectra with their windows and baselines.
 *
 * Classes: `spectrum` paths (`data-label`), `band-window`, `baseline-window` and `region` rectangles (with
 * `data-low`, `data-high` in cm⁻¹), `fitted-baseline` paths, `panel-frame`, axes with
 * `axis-label`, `legend`.
 *
 * @param input - what to draw
 * @param options - id, size, axis direction and ranges
 * @returns SVG markup
 */
export function renderSpectra(input: SpectraPlotInput, options: SpectraOptions = {}): string {
  const id = options.id ?? 'spectra';
  const width = options.width ?? 720;
  const panelHeight = options.panelHeight ?? 300;
  const direction = options.wavenumberAxis ?? 'descending';

  const groups: string[] = [];
  const groupOf = input.series.map((s) => {
    const group = s.group ?? s.label;
    if (!groups.includes(group)) groups.push(group);
    return groups.indexOf(group);
  });
  const legendEntries: LegendEntry[] = groups.map((group, i) => ({
    label: group,
    colour: seriesStyle(i).colour,
    dash: seriesStyle(i).dash,
    line: true,
  }));
  if (input.band !== undefined)
    legendEntries.push({ label: `band ${formatWindow(input.band)}`, colour: BAND_FILL, area: 0.16 });
  if (input.baselineWindows.length > 0)
    legendEntries.push({ label: 'baseline windows', colour: BASELINE_FILL, area: 1, pattern: `${id}-hatch` });
  if ((input.regions ?? []).length > 0)
    legendEntries.push({ label: 'fit regions', colour: BASELINE_FILL, area: 0.12 });
  if (input.baselines.length > 0)
    legendEntries.push({
      label: 'fitted baseline',
      colour: MUTED,
      dash: '1.5 2',
      line: true,
      lineWidth: 1.2,
    });
  const { legend, panel } = legendAndPanel(legendEntries, { width, panelHeight });
  const notes = input.notes ?? [];
  const height = panelBottom(panel) + PLOT_MARGIN.bottom + notes.length * NOTE_LINE_HEIGHT;

  let range: [number, number];
  if (options.range !== undefined) range = [options.range[0], options.range[1]];
  else {
    const span = windowSpan(input.band, [...input.baselineWindows, ...(input.regions ?? [])]);
    if (span !== undefined) {
      const margin = 0.15 * (span[1] - span[0]);
      range = [span[0] - margin, span[1] + margin];
    } else
      range = paddedExtent(
        input.series.map((s) => s.x),
        { pad: 0 },
      );
    const dataExtent = paddedExtent(
      input.series.map((s) => s.x),
      { pad: 0 },
    );
    if (input.series.length > 0)
      range = [Math.max(range[0], dataExtent[0]), Math.min(range[1], dataExtent[1])];
  }
  const x = wavenumberScale(range, panel, direction);
  const thinned = input.series.map((s) =>
    thinForDrawing(s.x, s.y, range[0], range[1], Math.ceil(panel.width)),
  );
  // Scale absorbance to what lies inside the windows or regions, where the reader looks; strong
  // absorption outside them (water, CO2) would otherwise flatten the bands of interest.
  const focus = windowSpan(input.band, [...input.baselineWindows, ...(input.regions ?? [])]) ?? range;
  const inFocus = thinned.map((t) =>
    t.y.filter((_, k) => (t.x[k] as number) >= focus[0] && (t.x[k] as number) <= focus[1]),
  );
  const y = linearAxisScale(
    options.absorbanceDomain ?? paddedExtent([...inFocus, ...input.baselines.map((b) => b.y)], { pad: 0.05 }),
    [panelBottom(panel), panel.top],
    {
      nice: options.absorbanceDomain === undefined,
    },
  );
  const px = (v: number): number => x.scale(v);
  const py = (v: number): number => y.scale(v);
  const clip = `${id}-clip`;
  const defs = clipPath(clip, panel) + hatchPattern(`${id}-hatch`, BASELINE_FILL);

  const shade = (
    window: Window,
    className: string,
    fill: string,
    opacity: number | undefined,
    label: string,
  ) => windowRect(panel, window, px, { className, fill, opacity, stroke: 'none', label });
  const windows: string[] = [];
  for (const region of input.regions ?? [])
    windows.push(shade(region, 'region', BASELINE_FILL, 0.12, `fit region ${formatWindow(region)}`));
  if (input.band !== undefined)
    windows.push(
      shade(
        input.band,
        'band-window',
        BAND_FILL,
        0.16,
        `band (integration window) ${formatWindow(input.band)}`,
      ),
    );
  input.baselineWindows.forEach((w) =>
    windows.push(
      shade(w, 'baseline-window', `url(#${id}-hatch)`, undefined, `baseline window ${formatWindow(w)}`),
    ),
  );
  const body: string[] = [
    panelFrame(panel),
    element('g', { class: 'windows', 'clip-path': `url(#${clip})` }, windows.join('')),
    panelAxes(
      panel,
      { ticks: x.ticks, position: px, format: x.format, label: wavenumberAxisLabel(direction) },
      { ticks: y.ticks, position: py, format: y.format, label: input.yLabel ?? 'absorbance (decadic) / AU' },
    ),
  ];

  // Saturated points (NaN) leave gaps in the trace rather than breaking the whole path.
  const path = line<number>().digits(2);
  const spectra = thinned.map((t, i) => {
    const style = seriesStyle(groupOf[i] as number);
    const d =
      path
        .defined((_, k) => Number.isFinite(t.y[k]))
        .x((_, k) => px(t.x[k] as number))
        .y((_, k) => py(t.y[k] as number))(t.x) ?? '';
    return element(
      'path',
      {
        class: 'spectrum',
        'data-label': input.series[i]?.label ?? '',
        d,
        fill: 'none',
        stroke: style.colour,
        'stroke-width': 1.2,
        'stroke-dasharray': style.dash,
        'stroke-linejoin': 'round',
      },
      element('title', {}, escapeText(input.series[i]?.label ?? '')),
    );
  });
  const baselines = input.baselines.map((b) => {
    const style = seriesStyle(groupOf[b.series] ?? 0);
    const d =
      path
        .defined((_, k) => Number.isFinite(b.y[k]))
        .x((_, k) => px(b.x[k] as number))
        .y((_, k) => py(b.y[k] as number))(b.x as number[]) ?? '';
    return element('path', {
      class: 'fitted-baseline',
      'data-series': String(b.series),
      d,
      fill: 'none',
      stroke: style.colour,
      'stroke-width': 1,
      'stroke-dasharray': '1.5 2',
      'stroke-opacity': 0.9,
    });
  });
  body.push(
    element('g', { class: 'series', 'clip-path': `url(#${clip})` }, spectra.join('') + baselines.join('')),
  );
  if (input.series.length === 0) body.push(noteText(panel.left + 10, panel.top + 20, 'no spectra to draw'));
  body.push(...notesBelow(panel, notes));
  body.push(legend.svg);

  return svgDocument({
    id,
    kind: 'plot-spectra',
    width,
    height,
    title: input.title,
    description:
      `${input.series.length} absorbance spectra` +
      `${input.band === undefined ? '' : `, band ${formatWindow(input.band)} shaded`}` +
      `${
        input.baselineWindows.length > 0
          ? `, baseline windows ${input.baselineWindows.map(formatWindow).join(', ')} hatched`
          : ''
      }` +
      `${input.baselines.length > 0 ? ', fitted baselines dotted' : ''}.`,
    defs,
    body: body.join(''),
  });
}

/** A spectrum with what it is, for {@link gasSpectraData}. */
export interface LabelledSpectrum {
  /** Scan name. */
  label: string;
  /** The scan (any y-kind; converted to absorbance). */
  spectrum: Spectrum;
  /** Legend group, e.g. `50 ppm`. */
  group?: string;
}

/** A labelled spectrum as a series to draw, given the spectrum in absorbance. */
function labelledSeries(item: LabelledSpectrum, absorbance: Spectrum): SpectrumSeries {
  return {
    label: item.label,
    x: absorbance.x,
    y: absorbance.y,
    ...(item.group === undefined ? {} : { group: item.group }),
  };
}

/**
 * Plot input for the spectra of one gas of a band calibration: each spectrum, the gas's band
 * and baseline windows, and each spectrum's baseline fitted exactly as the calibration fits it
 * (same windows and order), drawn from the lowest to the highest window edge.
 *
 * @param gas - a gas calibration with a band feature
 * @param spectra - labelled spectra (standards or samples)
 * @param options - `title` (default `<gas> standards`), `notes` printed under the plot
 * @returns plot input; spectra whose baseline cannot be fitted (windows outside the scan) are drawn
 *   without it and named in the notes
 */
export function gasSpectraData(
  gas: GasCalibration,
  spectra: readonly LabelledSpectrum[],
  options: { title?: string; notes?: readonly string[] } = {},
): SpectraPlotInput {
  const feature = gas.feature;
  const notes = [...(options.notes ?? [])];
  const series: SpectrumSeries[] = [];
  const baselines: BaselineSeries[] = [];
  spectra.forEach((item) => {
    const absorbance = toAbsorbance(item.spectrum);
    const index = series.length;
    series.push(labelledSeries(item, absorbance));
    if (feature === undefined || feature.baseline.length === 0) return;
    try {
      const fitted = fitBaseline(absorbance, feature.band, {
        windows: feature.baseline,
        order: feature.baselineOrder,
      });
      const span = windowSpan(feature.band, feature.baseline) as [number, number];
      const xs = Array.from({ length: 81 }, (_, k) => span[0] + ((span[1] - span[0]) * k) / 80);
      baselines.push({ series: index, x: xs, y: xs.map((v) => evaluateBaseline(fitted, v)) });
    } catch (error) {
      notes.push(
        `${item.label}: baseline not drawn (${error instanceof Error ? error.message : String(error)})`,
      );
    }
  });
  return {
    title: options.title ?? `${gas.gas} standards: spectra, band and baseline windows`,
    series,
    ...(feature === undefined ? {} : { band: feature.band }),
    baselineWindows: feature?.baseline ?? [],
    baselines,
    notes,
  };
}

/**
 * Legend group for a standard: its certified concentration, e.g. `50 ppm`.
 *
 * @param value - concentration
 * @param unit - unit
 */
export function concentrationGroup(value: number, unit: Parameters<typeof unitLabel>[0]): string {
  return `${formatNumber(value, 4)
    .replace(/(\.\d*?)0+$/, '$1')
    .replace(/\.$/, '')} ${unitLabel(unit)}`;
}

/**
 * Plot input for the standards of a classical-least-squares calibration: each spectrum over the
 * method's regions (shaded), grouped by the standard's certified concentrations.
 *
 * @param calibration - a CLS calibration
 * @param spectra - labelled spectra (groups already set by the caller, e.g. `CO 50 ppm, NO 20 ppm`)
 * @param options - `notes` printed under the plot
 */
export function clsStandardsSpectraData(
  calibration: Calibration,
  spectra: readonly LabelledSpectrum[],
  options: { notes?: readonly string[] } = {},
): SpectraPlotInput {
  return {
    title: `Standards: spectra over the fit regions`,
    series: spectra.map((item) => labelledSeries(item, toAbsorbance(item.spectrum))),
    baselineWindows: [],
    regions: calibration.cls?.regions ?? [],
    baselines: [],
    notes: [...(options.notes ?? [])],
  };
}
