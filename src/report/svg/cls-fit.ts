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
  legendAndPanel,
  linearAxisScale,
  NOTE_LINE_HEIGHT,
  notesBelow,
  paddedExtent,
  panelAxes,
  svgDocument,
  wavenumberAxisLabel,
  wavenumberScale,
  type LegendEntry,
  type PlotOptions,
  type WavenumberAxis,
} from './chart.js';
import { element } from './markup.js';
import { BASELINE_FILL, INK, seriesStyle } from './palette.js';
import {
  horizontalRule,
  panelBelow,
  panelBottom,
  panelFrame,
  panelTitle,
  PLOT_MARGIN,
  windowRect,
} from './panel.js';

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

/** Size and axis options of {@link renderClsFit} (default id `cls-fit`). */
export interface ClsFitPlotOptions extends PlotOptions {
  /** Fit panel height, px (default 260). */
  fitHeight?: number;
  /** Residual panel height, px (default 110). */
  residualHeight?: number;
  /** Wavenumber axis direction (default `descending`). */
  wavenumberAxis?: WavenumberAxis;
}

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
        `CLS plot: grid[${i}] = ${input.grid[i]} is not above grid[${i - 1}] = ${input.grid[i - 1]}; ` +
          `the grid must ascend`,
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
 * @throws BandwrightError `INVALID_VALUE` when an array's length differs from the grid's;
 *   `NOT_MONOTONIC` for a grid that does not ascend
 */
export function renderClsFit(input: ClsFitPlotInput, options: ClsFitPlotOptions = {}): string {
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
  const { legend, panel: fitPanel } = legendAndPanel(legendEntries, {
    width,
    panelHeight: options.fitHeight ?? 260,
  });
  const residualPanel = panelBelow(fitPanel, options.residualHeight ?? 110);
  const notes = input.notes ?? [];
  const height = panelBottom(residualPanel) + PLOT_MARGIN.bottom + notes.length * NOTE_LINE_HEIGHT;

  const n = input.grid.length;
  const range: [number, number] = n === 0 ? [0, 1] : [input.grid[0] as number, input.grid[n - 1] as number];
  const x = wavenumberScale(range, fitPanel, direction);
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
      .defined((i) => i >= 0 && Number.isFinite(values[i]))
      .x((i) => px(input.grid[i] as number))
      .y((i) => scale(values[i] as number))
      .digits(2)(withBreaks) ?? '';

  const clipFit = `${id}-clip-fit`;
  const clipResidual = `${id}-clip-residual`;
  const defs = clipPath(clipFit, fitPanel) + clipPath(clipResidual, residualPanel);
  const body: string[] = [];
  const regions = (input.regions ?? []).flatMap((region) =>
    [fitPanel, residualPanel].map((panel) =>
      windowRect(panel, region, px, {
        className: 'region',
        fill: BASELINE_FILL,
        opacity: 0.08,
        label: `fit region ${formatWindow(region)}`,
      }),
    ),
  );
  body.push(
    element('g', { class: 'regions' }, regions.join('')),
    panelFrame(fitPanel, 'fit'),
    panelAxes(
      fitPanel,
      { ticks: x.ticks, position: px, format: x.format, label: wavenumberAxisLabel(direction) },
      {
        ticks: y.ticks,
        position: (v) => y.scale(v),
        format: y.format,
        label: 'absorbance (decadic) / AU',
      },
    ),
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
    panelFrame(residualPanel, 'residual'),
    panelAxes(
      residualPanel,
      { ticks: x.ticks, position: px, format: x.format, label: 'wavenumber / cm⁻¹' },
      {
        ticks: r.ticks,
        position: (v) => r.scale(v),
        format: r.format,
        label: 'residual / AU',
        className: 'axis-residual',
      },
    ),
  );
  const rmsText =
    input.residualRms === undefined
      ? ''
      : `: RMS ${formatNumber(input.residualRms, 3)} AU` +
        `${
          input.calibrationResidualRms === undefined
            ? ''
            : ` (calibration ${formatNumber(input.calibrationResidualRms, 3)} AU)`
        }`;
  body.push(
    panelTitle(residualPanel, `Residual (measured − fitted)${rmsText}`),
    element(
      'g',
      { class: 'residual-layer', 'clip-path': `url(#${clipResidual})` },
      horizontalRule(residualPanel, r.scale(0), {
        className: 'zero-line',
        colour: fittedStyle.colour,
        width: 1,
      }) +
        element('path', {
          class: 'residual-spectrum',
          d: trace(input.residual, (v) => r.scale(v)),
          fill: 'none',
          stroke: INK,
          'stroke-width': 1,
        }),
    ),
    ...notesBelow(residualPanel, notes),
  );
  body.push(legend.svg);
  return svgDocument({
    id,
    kind: 'plot-cls-fit',
    width,
    height,
    title: input.title,
    description:
      `Measured spectrum, fitted model and the contributions of ` +
      `${input.contributions.map((c) => c.gas).join(', ') || 'no component'}; ` +
      `residual below${rmsText === '' ? '' : ` (${rmsText.slice(2)})`}.`,
    defs,
    body: body.join(''),
  });
}
