/**
 * Calibration curve plot: the standards (response at reference conditions against certified
 * concentration), the fitted curve, its confidence band and the prediction band for one new
 * response, the detection and determination limits as vertical lines, and below it the residuals
 * of the standards against concentration on the same concentration axis.
 *
 * {@link calibrationCurveData} takes what to draw from a gas calibration;
 * {@link renderCalibrationCurve} draws any {@link CalibrationCurvePlotInput}, so a script can plot
 * its own data the same way.
 */
import { area, line, symbolCircle } from 'd3-shape';
import type { GasCalibration } from '../../calibration/calibration.js';
import { unitLabel } from '../../gas/units.js';
import { fittedCurveWithBands } from '../../models/univariate/curve-bands.js';
import { formatNumber } from '../table.js';
import {
  clipPath,
  legendAndPanel,
  linearAxisScale,
  markerPath,
  paddedExtent,
  panelAxes,
  svgDocument,
  type LegendEntry,
  type PanelAxisSpec,
  type PlotOptions,
} from './chart.js';
import { element, escapeText, translate } from './markup.js';
import {
  horizontalRule,
  panelBelow,
  panelBottom,
  panelFrame,
  panelTitle,
  PLOT_MARGIN,
  verticalRule,
} from './panel.js';
import { ALERT, INK, INTERVAL_FILL, seriesStyle } from './palette.js';

/** One standard on the plot. */
export interface CurveStandardPoint {
  /** Certified concentration, in the plot's unit. */
  concentration: number;
  /** Response at reference conditions. */
  response: number;
  /** Residual response − fitted response. */
  residual: number;
  /** Label shown on hover (scan name, lot). */
  label?: string;
}

/** One point of the fitted curve with its bands. */
export interface CurveBandPoint {
  /** Concentration. */
  concentration: number;
  /** Fitted response. */
  response: number;
  /** Prediction band for one new response [low, high]. */
  prediction: readonly [number, number];
  /** Confidence band of the curve [low, high], when drawn. */
  confidence?: readonly [number, number];
}

/** A limit drawn as a vertical line. */
export interface CurveLimitLine {
  /** Short name shown in the legend, e.g. `LOD`. */
  name: string;
  /** Concentration. */
  value: number;
  /** Where the value comes from, shown on hover. */
  definition?: string;
}

/** Everything the calibration curve plot draws. Plain data: build it from anything. */
export interface CalibrationCurvePlotInput {
  /** Gas name (plain text; escaped when drawn). */
  gas: string;
  /** Concentration unit label, e.g. `ppm`. */
  unit: string;
  /** Response axis label with its unit, e.g. `band area / AU·cm⁻¹`. */
  responseLabel: string;
  /** The standards. */
  standards: readonly CurveStandardPoint[];
  /** The fitted curve, ascending in concentration. */
  curve: readonly CurveBandPoint[];
  /** Level of the bands, e.g. 0.95. */
  level: number;
  /** Limits as vertical lines (first drawn dashed, second dotted). */
  limits: readonly CurveLimitLine[];
  /** Curve description for the title, e.g. `second-order`. */
  curveName?: string;
}

/** Size and axis options of {@link renderCalibrationCurve} (default id `calibration-curve`). */
export interface CalibrationCurveOptions extends PlotOptions {
  /** Height of the curve panel, px (default 300). */
  curveHeight?: number;
  /** Height of the residual panel, px (default 110). */
  residualHeight?: number;
  /** Concentration axis [left, right], used as given (default: 0 to the largest standard, rounded outwards). */
  concentrationDomain?: readonly [number, number];
  /** Response axis [bottom, top], used as given (default: the data and bands, rounded outwards). */
  responseDomain?: readonly [number, number];
  /** Residual axis [bottom, top], used as given (default: symmetric about 0). */
  residualDomain?: readonly [number, number];
}

/** Concentrations are never negative: when every value is ≥ 0 the axis starts exactly at 0. */
function startAtZero(extent: [number, number], values: readonly number[]): [number, number] {
  return values.every((v) => v >= 0) ? [0, extent[1]] : extent;
}

const LEVEL_WORDS = (level: number): string => `${formatNumber(level * 100, 3).replace(/\.0+$/, '')} %`;

/**
 * The plot input for one gas of a calibration: scaled responses of the standards, the fitted
 * curve with confidence and prediction bands at `level` over the calibrated range, and the
 * detection and determination limits.
 *
 * @param gas - a gas calibration (univariate model)
 * @param options - `level` of the bands (default 0.95), `points` on the curve (default 121)
 * @returns plot input
 * @throws BandwrightError `INVALID_VALUE` for a level outside (0, 1)
 */
export function calibrationCurveData(
  gas: GasCalibration,
  options: { level?: number; points?: number; standardLabels?: readonly string[] } = {},
): CalibrationCurvePlotInput {
  const level = options.level ?? 0.95;
  const model = gas.model;
  const count = Math.max(2, Math.round(options.points ?? 121));
  const [low, high] = model.range;
  const start = Math.min(0, low);
  const concentrations = Array.from({ length: count }, (_, i) => start + ((high - start) * i) / (count - 1));
  const band = fittedCurveWithBands(model, concentrations, { level });
  const limits: CurveLimitLine[] = [];
  const { detection, determination } = model.limits;
  if (detection.value !== null)
    limits.push({ name: 'LOD', value: detection.value, definition: detection.definition });
  if (determination.value !== null)
    limits.push({ name: 'LOQ', value: determination.value, definition: determination.definition });
  const responseWord =
    gas.feature === undefined
      ? 'response'
      : gas.feature.response === 'area'
        ? 'band area / AU·cm⁻¹'
        : 'peak height / AU';
  return {
    gas: gas.gas,
    unit: unitLabel(gas.unit),
    responseLabel: gas.feature === undefined ? 'response (as tabulated)' : responseWord,
    standards: model.data.concentration.map((concentration, i) => ({
      concentration,
      response: model.data.response[i] as number,
      residual: model.residuals[i] as number,
      ...(options.standardLabels?.[i] === undefined ? {} : { label: options.standardLabels[i] }),
    })),
    curve: band.map((point) => ({
      concentration: point.concentration,
      response: point.response,
      prediction: point.prediction,
      confidence: point.confidence,
    })),
    level,
    limits,
    curveName: {
      linear: 'straight line',
      origin: 'straight line through the origin',
      quadratic: 'second-order curve',
    }[model.form],
  };
}

/**
 * Draws a calibration curve with its bands and limits, and the residual panel below.
 *
 * Classes a reader (or a test) can rely on: `standard` markers (`<path>` with
 * `transform="translate(x,y)"` at the point and `data-concentration`, `data-response`),
 * `fitted-curve`, `confidence-band`, `prediction-band`, `limit-line`, `residual` markers,
 * `zero-line`, `panel-frame` (curve panel, then residual panel), axes `axis-x`/`axis-y` with
 * `axis-label` text.
 *
 * @param input - what to draw
 * @param options - id, size, fixed axis domains
 * @returns SVG markup
 */
export function renderCalibrationCurve(
  input: CalibrationCurvePlotInput,
  options: CalibrationCurveOptions = {},
): string {
  const id = options.id ?? 'calibration-curve';
  const width = options.width ?? 720;
  const curveHeight = options.curveHeight ?? 300;
  const residualHeight = options.residualHeight ?? 110;
  const curveStyle = seriesStyle(0);
  const lodStyles = [
    { colour: seriesStyle(1).colour, dash: '6 3' },
    { colour: seriesStyle(2).colour, dash: '2 2.5' },
  ];
  const level = LEVEL_WORDS(input.level);

  const legendEntries: LegendEntry[] = [
    { label: 'standards', colour: INK, marker: symbolCircle },
    { label: `fitted ${input.curveName ?? 'curve'}`, colour: curveStyle.colour, line: true, lineWidth: 2 },
  ];
  const hasConfidence = input.curve.some((p) => p.confidence !== undefined);
  if (hasConfidence)
    legendEntries.push({ label: `${level} confidence band (curve)`, colour: INTERVAL_FILL, area: 0.3 });
  legendEntries.push({
    label: `${level} prediction band (one new response)`,
    colour: INTERVAL_FILL,
    area: 0.12,
  });
  input.limits.forEach((limit, i) => {
    const style = lodStyles[i % lodStyles.length] as { colour: string; dash: string };
    legendEntries.push({
      label: `${limit.name} ${formatNumber(limit.value, 3)} ${input.unit}`,
      colour: style.colour,
      dash: style.dash,
      line: true,
    });
  });
  const { legend, panel: curvePanel } = legendAndPanel(legendEntries, { width, panelHeight: curveHeight });
  const residualPanel = panelBelow(curvePanel, residualHeight);
  const height = panelBottom(residualPanel) + PLOT_MARGIN.bottom;

  const concentrationValues = [
    ...input.standards.map((s) => s.concentration),
    ...input.curve.map((p) => p.concentration),
  ];
  const concentrationDomain =
    options.concentrationDomain ??
    startAtZero(paddedExtent([concentrationValues], { pad: 0.03, include: [0] }), concentrationValues);
  const x = linearAxisScale(concentrationDomain, [curvePanel.left, curvePanel.left + curvePanel.width], {
    nice: false,
  });
  const responseValues = [
    ...input.standards.map((s) => s.response),
    ...input.curve.flatMap((p) => [p.prediction[0], p.prediction[1], ...(p.confidence ?? [])]),
  ];
  const y = linearAxisScale(
    options.responseDomain ?? paddedExtent([responseValues], { pad: 0.04 }),
    [panelBottom(curvePanel), curvePanel.top],
    { nice: false },
  );
  const largestResidual = Math.max(
    ...input.standards.map((s) => Math.abs(s.residual)).filter(Number.isFinite),
    0,
  );
  const residualDomain =
    options.residualDomain ??
    (largestResidual > 0 ? [-1.15 * largestResidual, 1.15 * largestResidual] : [-1, 1]);
  const r = linearAxisScale(residualDomain, [panelBottom(residualPanel), residualPanel.top], {
    tickCount: 4,
    nice: options.residualDomain === undefined,
  });

  const clipCurve = `${id}-clip-curve`;
  const clipResidual = `${id}-clip-residual`;
  const defs = clipPath(clipCurve, curvePanel) + clipPath(clipResidual, residualPanel);
  const px = (c: number): number => x.scale(c);
  const py = (v: number): number => y.scale(v);

  const concentrationAxis: PanelAxisSpec = {
    ticks: x.ticks,
    position: px,
    format: x.format,
    label: `${input.gas} concentration / ${input.unit}`,
  };
  const body: string[] = [
    panelFrame(curvePanel, 'curve'),
    panelAxes(curvePanel, concentrationAxis, {
      ticks: y.ticks,
      position: py,
      format: y.format,
      label: input.responseLabel,
    }),
  ];

  const inside: string[] = [];
  const predictionArea = area<CurveBandPoint>()
    .x((p) => px(p.concentration))
    .y0((p) => py(p.prediction[0]))
    .y1((p) => py(p.prediction[1]))
    .digits(2);
  inside.push(
    element('path', {
      class: 'prediction-band',
      d: predictionArea(input.curve as CurveBandPoint[]) ?? '',
      fill: INTERVAL_FILL,
      'fill-opacity': 0.12,
      stroke: 'none',
    }),
  );
  if (hasConfidence) {
    const confidenceArea = area<CurveBandPoint>()
      .defined((p) => p.confidence !== undefined)
      .x((p) => px(p.concentration))
      .y0((p) => py((p.confidence as readonly [number, number])[0]))
      .y1((p) => py((p.confidence as readonly [number, number])[1]))
      .digits(2);
    inside.push(
      element('path', {
        class: 'confidence-band',
        d: confidenceArea(input.curve as CurveBandPoint[]) ?? '',
        fill: INTERVAL_FILL,
        'fill-opacity': 0.3,
        stroke: 'none',
      }),
    );
  }
  const curveLine = line<CurveBandPoint>()
    .x((p) => px(p.concentration))
    .y((p) => py(p.response))
    .digits(2);
  inside.push(
    element('path', {
      class: 'fitted-curve',
      d: curveLine(input.curve as CurveBandPoint[]) ?? '',
      fill: 'none',
      stroke: curveStyle.colour,
      'stroke-width': 2,
    }),
  );
  body.push(element('g', { class: 'curve-layer', 'clip-path': `url(#${clipCurve})` }, inside.join('')));

  const marker = markerPath(symbolCircle);
  // Standards and their residuals share one look, so the reader pairs them across the panels.
  const standardMark = (
    className: string,
    standard: CurveStandardPoint,
    pixelY: number,
    data: Readonly<Record<string, string>>,
    children?: string,
  ): string =>
    element(
      'path',
      {
        class: className,
        d: marker,
        transform: translate(px(standard.concentration), pixelY),
        'data-concentration': String(standard.concentration),
        ...data,
        fill: INK,
        'fill-opacity': 0.85,
        stroke: '#ffffff',
        'stroke-width': 0.8,
      },
      children,
    );
  const standards = input.standards.map((s) =>
    standardMark(
      'standard',
      s,
      py(s.response),
      { 'data-response': String(s.response) },
      element(
        'title',
        {},
        escapeText(
          `${s.label === undefined ? '' : `${s.label}: `}${formatNumber(s.concentration)} ${input.unit}, ` +
            `response ${formatNumber(s.response, 5)}, residual ${formatNumber(s.residual, 3)}`,
        ),
      ),
    ),
  );
  body.push(element('g', { class: 'standards' }, standards.join('')));

  // Limits run through both panels so the reader can see where the blank region ends.
  const limitLines = input.limits.map((limit, i) => {
    const style = lodStyles[i % lodStyles.length] as { colour: string; dash: string };
    const lx = px(limit.value);
    if (!(lx >= curvePanel.left && lx <= curvePanel.left + curvePanel.width)) return '';
    const tooltip = element(
      'title',
      {},
      escapeText(
        `${limit.name} = ${formatNumber(limit.value, 4)} ${input.unit}` +
          `${limit.definition === undefined ? '' : `: ${limit.definition}`}`,
      ),
    );
    const rule = { colour: style.colour, width: 1.4, dash: style.dash };
    return element(
      'g',
      { class: 'limit-line', 'data-limit': limit.name },
      verticalRule(curvePanel, lx, rule, tooltip) + verticalRule(residualPanel, lx, rule),
    );
  });
  body.push(element('g', { class: 'limits' }, limitLines.join('')));

  body.push(
    panelFrame(residualPanel, 'residuals'),
    panelAxes(residualPanel, concentrationAxis, {
      ticks: r.ticks,
      position: (v) => r.scale(v),
      format: r.format,
      label: 'residual',
      className: 'axis-residual',
    }),
    panelTitle(residualPanel, 'Residuals (response − fitted) against concentration'),
  );
  const residualMarks = [
    horizontalRule(residualPanel, r.scale(0), {
      className: 'zero-line',
      colour: curveStyle.colour,
      width: 1.2,
    }),
    ...input.standards.map((s) =>
      standardMark('residual', s, r.scale(s.residual), { 'data-residual': String(s.residual) }),
    ),
  ];
  body.push(
    element('g', { class: 'residuals', 'clip-path': `url(#${clipResidual})` }, residualMarks.join('')),
  );
  if (
    input.standards.some(
      (s) =>
        Math.abs(s.residual) > 0 &&
        !(r.scale(s.residual) >= residualPanel.top && r.scale(s.residual) <= panelBottom(residualPanel)),
    )
  ) {
    body.push(
      element(
        'text',
        {
          class: 'plot-note',
          x: residualPanel.left + residualPanel.width,
          y: residualPanel.top - 8,
          'text-anchor': 'end',
          'font-size': 11,
          fill: ALERT,
        },
        'some residuals are outside the axis',
      ),
    );
  }
  body.push(legend.svg);

  const described =
    `${input.gas} calibration: ${input.standards.length} standards, ` +
    `fitted ${input.curveName ?? 'curve'} with ${level} confidence and prediction bands` +
    `${
      input.limits.length > 0
        ? `, ${input.limits.map((l) => `${l.name} ${formatNumber(l.value, 3)} ${input.unit}`).join(', ')}`
        : ''
    }` +
    `; residuals below.`;
  return svgDocument({
    id,
    kind: 'plot-calibration-curve',
    width,
    height,
    title: `${input.gas} calibration curve${input.curveName === undefined ? '' : ` (${input.curveName})`}`,
    description: described,
    defs,
    body: body.join(''),
  });
}
