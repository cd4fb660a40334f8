/**
 * Classical-least-squares fit plot: a sample's measured spectrum over the method's regions, the
 * fitted model spectrum, each component's contribution (its concentration times its pure
 * spectrum), and below it the residual (measured − fitted) on the same wavenumber axis. An
 * unmodelled absorber shows as structure in the residual.
 *
 * The input is plain arrays on one channel grid, so any CLS result can be drawn: channels of
 * several regions may be given in one ascending grid; a gap wider than three median channel
 * spacings breaks the lines instead of joining across it.
 */
import { line } from 'd3-shape';
import { formatWindow, type Window } from '../../bands/windows.js';
import { BandwrightError } from '../../errors.js';
import { formatNumber } from '../table.js';
import {
  clipPath,
  linearAxisScale,
  noteText,
  paddedExtent,
  panelBottom,
  renderAxis,
  renderLegend,
  svgDocument,
  type LegendEntry,
  type Panel,
} from './chart.js';
import { element, escapeText } from './markup.js';
import { BASELINE_FILL, INK, MUTED, seriesStyle } from './palette.js';
import type { WavenumberAxis } from './spectra.js';

/** One component's share of the fitted spectrum. */
export interface ClsContribution {
  /** Component name (gas or interferent; plain text). */
  gas: string;
  /** Contribution on each channel, absorbance. */
  values: ArrayLike<number>;
  /** False for an interferent that is modelled but not reported (drawn, marked in the legend). */
  reported?: boolean;
}

/** Everything the CLS fit plot draws. Plain data on one grid. */
export interface ClsFitPlotInput {
  /** Title (plain text). */
  title: string;
  /** Channel wavenumbers, cm⁻¹, ascending. */
  grid: ArrayLike<number>;
  /** Measured absorbance on the channels (after the same baseline removal as the fit, if any). */
  measured: ArrayLike<number>;
  /** Fitted absorbance on the channels. */
  fitted: ArrayLike<number>;
  /** Contributions by component. */
  contributions: readonly ClsContribution[];
  /** Residual measured − fitted on the channels. */
  residual: ArrayLike<number>;
  /** Spectral regions of the method, cm⁻¹, shaded lightly. */
  regions?: readonly Window[];
  /** RMS of the residual, AU, printed with the residual panel. */
  residualRms?: number;
  /** RMS of the calibration's residuals, AU, for comparison. */
  calibrationResidualRms?: number;
  /** Notes printed under the plot. */
  notes?: readonly string[];
}

/** Size and axis options of {@link renderClsFit}. */
export interface ClsFitOptions {
  /** Unique id (default `cls-fit`). */
  id?: string;
  /** Width, px (default 720). */
  width?: number;
  /** Fit panel height, px (default 260). */
  fitHeight?: number;
  /** Residual panel height, px (default 110). */
  residualHeight?: number;
  /** Wavenumber axis direction (default `descending`). */
  wavenumberAxis?: WavenumberAxis;
}

const MARGIN = { left: 78, right: 20, bottom: 50 } as const;

/** Breaks lines at gaps: returns indices after which a gap wider than 3 median spacings follows. */
function gapsAfter(grid: ArrayLike<number>): Set<number> {
  const spacings: number[] = [];
  for (let i = 1; i < grid.length; i++) spacings.push((grid[i] as number) - (grid[i - 1] as number));
  const sorted = [...spacings].sort((a, b) => a - b);
  const median = sorted[sorted.length >> 1] ?? 0;
  const gaps = new Set<number>();
  spacings.forEach((s, i) => {
    if (median > 0 && s > 3 * median) gaps.add(i);
  });
  return gaps;
}

function checkLengths(input: ClsFitPlotInput): void {
  const n = input.grid.length;
  const check = (values: ArrayLike<number>, name: string): void => {
    if (values.length !== n)
      throw new BandwrightError(
        'INVALID_VALUE',
        `CLS plot: ${name} has ${values.length} values, the grid has ${n}`,
        { parameter: name },
      );
  };
  check(input.measured, 'measured');
  check(input.fitted, 'fitted');
  check(input.residual, 'residual');
  input.contributions.forEach((c) => check(c.values, `contribution of ${c.gas}`));
  for (let i = 1; i < n; i++) {
    if (!((input.grid[i] as number) > (input.grid[i - 1] as number)))
      throw new BandwrightError(
        'NOT_MONOTONIC',
        `CLS plot: grid[${i}] = ${input.grid[i]} is not above grid[${i - 1}] = ${input.grid[i - 1]}; the grid must ascend`,
        { parameter: 'grid' },
      );
  }
}

/**
 * Draws a CLS fit and its residual.
 *
 * Classes: `measured`, `fitted`, `contribution` (`data-gas`), `residual-spectrum`, `zero-line`,
 * `region` rectangles, `panel-frame` (fit, then residual), axes with `axis-label`, `legend`.
 *
 * @param input - grid, measured, fitted, contributions, residual
 * @param options - id, size, axis direction
 * @returns SVG markup
 * @throws BandwrightError `INVALID_VALUE` when an array's length differs from the grid's; `NOT_MONOTONIC` for a grid that does not ascend
 */
export function renderClsFit(input: ClsFitPlotInput, options: ClsFitOptions = {}): string {
  checkLengths(input);
  const id = options.id ?? 'cls-fit';
  const width = options.width ?? 720;
  const direction = options.wavenumberAxis ?? 'descending';
  const fittedStyle = seriesStyle(0);

  const legendEntries: LegendEntry[] = [
    { label: 'measured', colour: INK, line: true, lineWidth: 1.8 },
    { label: 'fitted model', colour: fittedStyle.colour, dash: '7 3', line: true, lineWidth: 1.8 },
    ...input.contributions.map((c, i) => ({
      label: `${c.gas}${c.reported === false ? ' (interferent)' : ''}`,
      colour: seriesStyle(i + 1).colour,
      dash: seriesStyle(i + 1).dash,
      line: true,
    })),
  ];
  if ((input.regions ?? []).length > 0)
    legendEntries.push({ label: 'fit regions', colour: BASELINE_FILL, area: 0.08 });
  const legend = renderLegend(legendEntries, {
    x: MARGIN.left,
    y: 28,
    width: width - MARGIN.left - MARGIN.right,
  });
  const fitPanel: Panel = {
    left: MARGIN.left,
    top: 28 + legend.height + 10,
    width: width - MARGIN.left - MARGIN.right,
    height: options.fitHeight ?? 260,
  };
  const residualPanel: Panel = {
    left: fitPanel.left,
    top: panelBottom(fitPanel) + 74,
    width: fitPanel.width,
    height: options.residualHeight ?? 110,
  };
  const notes = input.notes ?? [];
  const height = panelBottom(residualPanel) + MARGIN.bottom + notes.length * 15;

  const n = input.grid.length;
  const range: [number, number] = n === 0 ? [0, 1] : [input.grid[0] as number, input.grid[n - 1] as number];
  const x = linearAxisScale(
    direction === 'descending' ? [range[1], range[0]] : range,
    [fitPanel.left, fitPanel.left + fitPanel.width],
    { nice: false, tickCount: 8 },
  );
  const y = linearAxisScale(
    paddedExtent([input.measured, input.fitted, ...input.contributions.map((c) => c.values)], { pad: 0.05 }),
    [panelBottom(fitPanel), fitPanel.top],
  );
  const residualExtent = paddedExtent([input.residual], { pad: 0.1 });
  const largest = Math.max(Math.abs(residualExtent[0]), Math.abs(residualExtent[1]));
  const r = linearAxisScale(
    largest > 0 ? [-largest, largest] : [-1, 1],
    [panelBottom(residualPanel), residualPanel.top],
    { tickCount: 4 },
  );
  const px = (v: number): number => x.scale(v);

  const gaps = gapsAfter(input.grid);
  const indices = Array.from({ length: n }, (_, i) => i);
  // A NaN sentinel after each gap index makes d3's `defined` break the line there.
  const withBreaks: number[] = [];
  for (const i of indices) {
    withBreaks.push(i);
    if (gaps.has(i)) withBreaks.push(-1);
  }
  const trace = (values: ArrayLike<number>, scale: (v: number) => number): string =>
    line<number>()
      .defined((i) => i >= 0 && Number.isFinite(values[i] as number))
      .x((i) => px(input.grid[i] as number))
      .y((i) => scale(values[i] as number))
      .digits(2)(withBreaks) ?? '';

  const clipFit = `${id}-clip-fit`;
  const clipResidual = `${id}-clip-residual`;
  const defs = clipPath(clipFit, fitPanel) + clipPath(clipResidual, residualPanel);
  const body: string[] = [];
  const regions = (input.regions ?? []).map((region) => {
    const a = px(region[0]);
    const b = px(region[1]);
    return [fitPanel, residualPanel]
      .map((panel) =>
        element(
          'rect',
          {
            class: 'region',
            'data-low': String(region[0]),
            'data-high': String(region[1]),
            x: Math.min(a, b),
            y: panel.top,
            width: Math.abs(b - a),
            height: panel.height,
            fill: BASELINE_FILL,
            'fill-opacity': 0.08,
          },
          element('title', {}, escapeText(`fit region ${formatWindow(region)}`)),
        ),
      )
      .join('');
  });
  body.push(element('g', { class: 'regions' }, regions.join('')));
  body.push(
    element('rect', {
      class: 'panel-frame',
      'data-panel': 'fit',
      x: fitPanel.left,
      y: fitPanel.top,
      width: fitPanel.width,
      height: fitPanel.height,
      fill: 'none',
      stroke: 'none',
    }),
  );
  body.push(
    renderAxis(fitPanel, {
      side: 'bottom',
      ticks: x.ticks,
      position: px,
      format: x.format,
      label: `wavenumber / cm⁻¹ (${direction === 'descending' ? 'decreasing to the right' : 'increasing to the right'})`,
    }),
  );
  body.push(
    renderAxis(fitPanel, {
      side: 'left',
      ticks: y.ticks,
      position: (v) => y.scale(v),
      format: y.format,
      label: 'absorbance (decadic) / AU',
    }),
  );
  const fitLines = [
    ...input.contributions.map((c, i) =>
      element('path', {
        class: 'contribution',
        'data-gas': c.gas,
        d: trace(c.values, (v) => y.scale(v)),
        fill: 'none',
        stroke: seriesStyle(i + 1).colour,
        'stroke-width': 1.2,
        'stroke-dasharray': seriesStyle(i + 1).dash,
      }),
    ),
    element('path', {
      class: 'measured',
      d: trace(input.measured, (v) => y.scale(v)),
      fill: 'none',
      stroke: INK,
      'stroke-width': 1.8,
    }),
    element('path', {
      class: 'fitted',
      d: trace(input.fitted, (v) => y.scale(v)),
      fill: 'none',
      stroke: fittedStyle.colour,
      'stroke-width': 1.8,
      'stroke-dasharray': '7 3',
    }),
  ];
  body.push(element('g', { class: 'fit-layer', 'clip-path': `url(#${clipFit})` }, fitLines.join('')));

  body.push(
    element('rect', {
      class: 'panel-frame',
      'data-panel': 'residual',
      x: residualPanel.left,
      y: residualPanel.top,
      width: residualPanel.width,
      height: residualPanel.height,
      fill: 'none',
      stroke: 'none',
    }),
  );
  body.push(
    renderAxis(residualPanel, {
      side: 'bottom',
      ticks: x.ticks,
      position: px,
      format: x.format,
      label: 'wavenumber / cm⁻¹',
    }),
  );
  body.push(
    renderAxis(residualPanel, {
      side: 'left',
      ticks: r.ticks,
      position: (v) => r.scale(v),
      format: r.format,
      label: 'residual / AU',
      className: 'axis-residual',
    }),
  );
  const rmsText =
    input.residualRms === undefined
      ? ''
      : `: RMS ${formatNumber(input.residualRms, 3)} AU${input.calibrationResidualRms === undefined ? '' : ` (calibration ${formatNumber(input.calibrationResidualRms, 3)} AU)`}`;
  body.push(
    element(
      'text',
      { class: 'panel-title', x: residualPanel.left, y: residualPanel.top - 8, 'font-size': 12, fill: MUTED },
      escapeText(`Residual (measured − fitted)${rmsText}`),
    ),
  );
  const zero = r.scale(0);
  body.push(
    element(
      'g',
      { class: 'residual-layer', 'clip-path': `url(#${clipResidual})` },
      element('line', {
        class: 'zero-line',
        x1: residualPanel.left,
        x2: residualPanel.left + residualPanel.width,
        y1: zero,
        y2: zero,
        stroke: fittedStyle.colour,
        'stroke-width': 1,
      }) +
        element('path', {
          class: 'residual-spectrum',
          d: trace(input.residual, (v) => r.scale(v)),
          fill: 'none',
          stroke: INK,
          'stroke-width': 1,
        }),
    ),
  );
  notes.forEach((note, i) =>
    body.push(noteText(residualPanel.left, panelBottom(residualPanel) + MARGIN.bottom + 4 + i * 15, note)),
  );
  body.push(legend.svg);
  return svgDocument({
    id,
    kind: 'plot-cls-fit',
    width,
    height,
    title: input.title,
    description: `Measured spectrum, fitted model and the contributions of ${input.contributions.map((c) => c.gas).join(', ') || 'no component'}; residual below${rmsText === '' ? '' : ` (${rmsText.slice(2)})`}.`,
    defs,
    body: body.join(''),
  });
}
