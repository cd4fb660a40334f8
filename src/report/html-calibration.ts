/**
 * The per-gas sections of the calibration report: statistics, linearity verdict, detection
 * limits, the standards table and the classical-least-squares summary. Pure text from a
 * calibration.
 */
import { formatWindow } from '../bands/windows.js';
import type { Calibration, GasCalibration } from '../calibration/calibration.js';
import { unitLabel } from '../gas/units.js';
import { hashCell, htmlTable, numberCell, paragraph, type Cell } from './html-page.js';
import { element, escapeText } from './svg/markup.js';
import { formatNumber } from './table.js';

const CURVE_WORDS = {
  linear: 'straight line r = a + b·c',
  origin: 'straight line through the origin r = b·c',
  quadratic: 'second order r = a + b·c + c₂·c²',
} as const;

/** A value with `digits` significant digits, or "not available" when the calibration has none. */
export function maybe(value: number | null, digits = 4): string {
  return value === null ? 'not available' : formatNumber(value, digits);
}

/**
 * The coefficient table of one gas: each coefficient with its standard error, then s, R², n and the
 * condition number.
 */
export function statisticsTable(gas: GasCalibration): string {
  const model = gas.model;
  const unit = unitLabel(gas.unit);
  const names: Record<'a' | 'b' | 'c', string> = {
    a: 'a (intercept)',
    b: `b (slope, per ${unit})`,
    c: `c₂ (second order, per ${unit}²)`,
  };
  const rows: Cell[][] = model.parameters.map((p) => [
    names[p],
    numberCell(formatNumber(model.coefficients[p], 6)),
    numberCell(formatNumber(model.standardErrors[p], 3)),
  ]);
  const table = htmlTable({
    caption: `${gas.gas}: coefficients`,
    header: ['coefficient', numberCell('value'), numberCell('standard error')],
    rows,
  });
  const facts = htmlTable({
    caption: `${gas.gas}: fit statistics`,
    header: ['statistic', numberCell('value')],
    rows: [
      ['standards (n)', numberCell(String(model.standards))],
      ['concentration levels', numberCell(String(model.levels.length))],
      [
        'calibrated range',
        numberCell(`${formatNumber(model.range[0])} – ${formatNumber(model.range[1])} ${unit}`),
      ],
      ['residual SD s', numberCell(formatNumber(model.residualSD, 4))],
      ['degrees of freedom', numberCell(String(model.degreesOfFreedom))],
      [`R² (${model.rSquaredKind})`, numberCell(model.rSquared.toFixed(6))],
      ['condition number (scaled design)', numberCell(formatNumber(model.conditionNumber, 3))],
      ['weighting', model.weighting.rule],
    ],
  });
  return table + facts;
}

/** The Mandel linearity test of one gas in plain words, with its numbers. */
export function linearityText(gas: GasCalibration): string {
  const mandel = gas.model.mandel;
  if (mandel === null)
    return paragraph(
      'Linearity: the Mandel fitting test needs at least 4 standards at 3 or more levels; it was not made.',
      'verdict',
    );
  return (
    element('p', { class: 'verdict' }, escapeText(`Linearity (Mandel test): ${mandel.recommendation}`)) +
    htmlTable({
      caption: `${gas.gas}: Mandel fitting test`,
      header: ['quantity', numberCell('value')],
      rows: [
        ['DS² = (n−2)s²(linear) − (n−3)s²(second order)', numberCell(formatNumber(mandel.ds2, 4))],
        ['test value PW = DS²/s²(second order)', numberCell(formatNumber(mandel.testValue, 4))],
        [
          `F(${mandel.confidence}; ${mandel.degreesOfFreedom[0]}, ${mandel.degreesOfFreedom[1]})`,
          numberCell(formatNumber(mandel.fCritical, 4)),
        ],
        ['p value', numberCell(formatNumber(mandel.pValue, 3))],
        [
          'significant',
          mandel.significant
            ? 'yes: the second-order curve fits significantly better'
            : 'no: a straight line is adequate',
        ],
      ],
    }) +
    paragraph(mandel.definition, 'muted')
  );
}

/** The decision, detection and determination limits of one gas, each with the definition it uses. */
export function limitsTable(gas: GasCalibration): string {
  const unit = unitLabel(gas.unit);
  const limits = gas.model.limits;
  const row = (name: string, limit: { value: number | null; definition: string }): Cell[] => [
    name,
    numberCell(maybe(limit.value, 3)),
    unit,
    limit.definition,
  ];
  const rows: Cell[][] = [
    row('decision limit x_C', limits.decision),
    row('detection limit x_D (LOD)', limits.detection),
    row('determination limit x_Q (LOQ)', limits.determination),
    row('ICH Q2 detection 3.3σ/b', limits.ichDetection),
    row('ICH Q2 quantitation 10σ/b', limits.ichQuantitation),
  ];
  if (gas.zeroGasLimit !== undefined) rows.push(row('zero-gas limit', gas.zeroGasLimit));
  return htmlTable({
    caption:
      `${gas.gas}: detection and determination limits ` +
      `(α = ${limits.alpha}, β = ${limits.beta}, k = ${limits.k})`,
    header: ['limit', numberCell('value'), 'unit', 'definition'],
    rows,
  });
}

/** The line under one gas's heading: what its response is measured over and which curve is fitted. */
export function gasHeading(gas: GasCalibration): string {
  const feature = gas.feature;
  const where =
    feature === undefined
      ? 'from tabulated responses'
      : `${feature.response === 'area' ? 'band area' : 'peak height'} over ${formatWindow(feature.band)}` +
        `${
          feature.baseline.length > 0
            ? `, baseline of order ${feature.baselineOrder} ` +
              `through ${feature.baseline.map(formatWindow).join(', ')}`
            : ', no baseline correction'
        }`;
  return paragraph(
    `${where}; curve: ${CURVE_WORDS[gas.model.form]}, ` +
      `${gas.model.weights === 'none' ? 'unweighted' : `weighted ${gas.model.weights}`}.`,
  );
}

/** The reported gases and their units, in column order (CLS components, else band gases). */
export function concentrationColumns(calibration: Calibration): { gas: string; unit: string }[] {
  if (calibration.cls !== undefined)
    return calibration.cls.model.components.map((c) => ({ gas: c.name, unit: c.unit }));
  return calibration.gases.map((g) => ({ gas: g.gas, unit: unitLabel(g.unit) }));
}

/**
 * The standards table: scan, certified concentrations, conditions, response and residual per standard.
 *
 * @param calibration - the calibration
 * @param spectrumStatus - the words shown for standard `index`'s spectrum file (matches, changed, missing)
 */
export function standardsTable(calibration: Calibration, spectrumStatus: (index: number) => string): string {
  const gases = calibration.gases;
  const columns = concentrationColumns(calibration);
  const header: Cell[] = [
    '#',
    'scan',
    'lot',
    ...columns.map((g) => numberCell(`${g.gas} / ${g.unit}`)),
    numberCell('path / m'),
    numberCell('T / K'),
    numberCell('P / kPa'),
    numberCell('φ'),
    ...gases.flatMap((g) => [numberCell(`${g.gas} response (scaled)`), numberCell(`${g.gas} residual`)]),
    'spectrum',
  ];
  const rows = calibration.standards.map((standard, i): Cell[] => [
    numberCell(String(i + 1)),
    hashCell(standard.scan),
    standard.lot ?? '',
    ...columns.map((g) =>
      numberCell(
        standard.concentrations[g.gas] === undefined
          ? ''
          : formatNumber(standard.concentrations[g.gas] as number, 5),
      ),
    ),
    numberCell(formatNumber(standard.conditions.pathLength_m, 4)),
    numberCell(formatNumber(standard.conditions.temperature_K, 5)),
    numberCell(formatNumber(standard.conditions.pressure_kPa, 5)),
    numberCell(formatNumber(standard.phi, 5)),
    ...gases.flatMap((g) => {
      const response = standard.responses[g.gas];
      const residual = g.model.residuals[i];
      return [
        numberCell(response === undefined ? '' : formatNumber(response.scaled, 5)),
        numberCell(residual === undefined ? '' : formatNumber(residual, 3)),
      ];
    }),
    spectrumStatus(i),
  ]);
  return htmlTable({
    caption:
      gases.length > 0
        ? 'Standards (certified values, cell conditions, responses at reference conditions, residuals)'
        : 'Standards (certified values and cell conditions)',
    header,
    rows,
  });
}

/** The classical-least-squares section (components, regions, fit statistics); empty for band calibrations. */
export function clsSection(calibration: Calibration): string {
  const cls = calibration.cls;
  if (cls === undefined || calibration.method.model !== 'cls') return '';
  const model = cls.model;
  const method = calibration.method;
  const statistics = model.calibration;
  const components = htmlTable({
    caption: 'Components',
    header: [
      'component',
      'role',
      'unit',
      numberCell('calibrated range'),
      numberCell('RMSECV'),
      numberCell('interval inflation'),
      numberCell('LOD'),
    ],
    rows: model.components.map((c, i): Cell[] => {
      const range = model.ranges[i];
      const rmsecv = model.crossValidation.rmsecv[i];
      const limit = cls.detectionLimits[c.name];
      return [
        c.name,
        c.reported ? 'reported' : 'interferent',
        c.unit,
        numberCell(range === undefined ? '' : `${formatNumber(range.min)} – ${formatNumber(range.max)}`),
        numberCell(rmsecv === undefined || rmsecv === null ? 'not available' : formatNumber(rmsecv, 3)),
        numberCell(formatNumber(model.crossValidation.inflation[i] ?? 1, 3)),
        numberCell(limit === undefined ? '—' : formatNumber(limit, 3)),
      ];
    }),
  });
  const facts = htmlTable({
    caption: 'Fit statistics',
    header: ['statistic', numberCell('value')],
    rows: [
      ['fit regions', cls.regions.map(formatWindow).join(', ')],
      ['baseline polynomial order per region', numberCell(String(method.baselineOrder))],
      ['background spectrum', method.background === undefined ? 'none' : String(method.background)],
      ['channels', numberCell(String(model.channelCount))],
      ['standards', numberCell(String(statistics.standards))],
      ['residual RMS of the standards / AU', numberCell(formatNumber(statistics.residualRms, 3))],
      ['residual degrees of freedom', numberCell(formatNumber(statistics.degreesOfFreedom, 4))],
      ['condition number, concentrations', numberCell(formatNumber(statistics.conditionConcentrations, 3))],
      ['condition number, pure spectra', numberCell(formatNumber(statistics.conditionPureSpectra, 3))],
    ],
  });
  return (
    paragraph(
      `Every component is fitted together over the regions (K-matrix classical least squares); ` +
        `the baseline polynomials are projected out of every spectrum. ` +
        `Interferents are modelled but not reported. ` +
        `Ranges and detection limits (LOD) are at the reference conditions: ` +
        `the LOD is 3.3 × the prediction standard error of a blank, and a sample's limit is this ÷ its φ. ` +
        `RMSECV is the root-mean-square error of leave-one-out cross-validation over the standards; ` +
        `the interval inflation is the factor the prediction intervals are widened by ` +
        `so that they cover those errors.`,
    ) +
    components +
    facts
  );
}
