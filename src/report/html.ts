/**
 * The calibration report: one self-contained HTML page for an analyst reviewing a calibration or
 * an auditor reading a test file. It holds the summary, per gas the statistics, the linearity
 * verdict, the detection limits and the plots (curve with prediction band and residuals, the
 * standards' spectra with windows and baselines), the standards table, the recheck history with
 * its control chart, the provenance (every input with its SHA-256 and whether the file on disk
 * still matches, tool versions, times) and the safety cautions.
 *
 * Pure: the caller reads the files (through `src/store`) and says what it found; this module only
 * turns that into text.
 */
import { formatWindow } from '../bands/windows.js';
import type { Calibration, CalibrationInput, GasCalibration } from '../calibration/calibration.js';
import { unitLabel } from '../gas/units.js';
import {
  bulletList,
  cautionBox,
  factList,
  figure,
  htmlPage,
  htmlTable,
  notice,
  numberCell,
  paragraph,
  type Cell,
} from './html-page.js';
import { element, escapeText, shortNumber, slug } from './svg/markup.js';
import { calibrationPlots, controlChartPlot, type NamedPlot, type StandardSpectrum } from './svg/plot-set.js';
import type { ControlChartInput } from './svg/control-chart.js';
import type { WavenumberAxis } from './svg/spectra.js';
import { formatNumber } from './table.js';

/** What was found for one recorded input file. */
export type InputFileStatus = 'unchanged' | 'changed' | 'missing' | 'unreadable';

/** A recorded input and what the file on disk is now. */
export interface InputCheck extends CalibrationInput {
  /** Whether the file still matches its recorded SHA-256. */
  status: InputFileStatus;
  /** SHA-256 of the file as it is now, when it could be read and differs. */
  currentSha256?: string;
  /** Why it could not be read, in words. */
  message?: string;
}

/** One recorded check in the history table (span and zero-gas checks alike). */
export interface RecheckRow {
  /** When it was measured, ISO 8601. */
  time: string;
  /** Certified concentration. */
  certified: number;
  /** Measured concentration. */
  measured: number;
  /** Unit of both. */
  unit: string;
  /** Recovery, % (absent for zero gas). */
  recoveryPct?: number;
  /** Verdict. */
  verdict: string;
  /** Rules that fired. */
  rules: readonly string[];
  /** Scan as named. */
  scan: string;
}

/** The recheck history of one gas as the report shows it: the control chart, the table, notes. */
export interface RecheckHistoryView {
  /** Gas. */
  gas: string;
  /** Control-chart input (records, tolerance, σ, trend). */
  chart: ControlChartInput;
  /** Every check, for the table (default: the chart's records). */
  rows?: readonly RecheckRow[];
  /** Notes about the history (e.g. which σ was used and why, the trend, when the next check is due). */
  notes?: readonly string[];
  /** Where the history was read from (plain text), for the provenance. */
  source?: string;
}

/** Everything the calibration report shows besides the calibration itself. */
export interface CalibrationReportInput {
  /** The verified calibration. */
  calibration: Calibration;
  /** The calibration file as the user named it. */
  calibrationFile: string;
  /** When the report was made, ISO 8601. */
  generatedAt: string;
  /** Tool making the report. */
  tool: { name: string; version: string };
  /** Recorded inputs with their status now (same order as `calibration.inputs`). */
  inputs: readonly InputCheck[];
  /** Standards' spectra that could be read and match their hash, by standard index. */
  spectra: readonly StandardSpectrum[];
  /** Plain-words notes about spectra that could not be used (missing, changed, unreadable). */
  spectraNotes: readonly string[];
  /** Recheck history per gas, when one exists. */
  histories?: readonly RecheckHistoryView[];
  /** Notes about the history (e.g. it belongs to another calibration and was not used). */
  historyNotes?: readonly string[];
}

/** Options of {@link calibrationReportHtml}. */
export interface CalibrationReportOptions {
  /** Wavenumber axis direction of spectra (default `descending`). */
  wavenumberAxis?: WavenumberAxis;
  /** Level of the bands drawn (default 0.95). */
  level?: number;
}

const CURVE_WORDS = {
  linear: 'straight line r = a + b·c',
  origin: 'straight line through the origin r = b·c',
  quadratic: 'second order r = a + b·c + c₂·c²',
} as const;

function levelText(level: number): string {
  return `${formatNumber(level * 100, 3).replace(/\.?0+$/, '')} %`;
}

function maybe(value: number | null, digits = 4): string {
  return value === null ? 'not available' : formatNumber(value, digits);
}

function statisticsTable(gas: GasCalibration): string {
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

function linearityText(gas: GasCalibration): string {
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

function limitsTable(gas: GasCalibration): string {
  const unit = unitLabel(gas.unit);
  const limits = gas.model.limits;
  const rows: Cell[][] = [
    ['decision limit x_C', numberCell(maybe(limits.decision.value, 3)), unit, limits.decision.definition],
    [
      'detection limit x_D (LOD)',
      numberCell(maybe(limits.detection.value, 3)),
      unit,
      limits.detection.definition,
    ],
    [
      'determination limit x_Q (LOQ)',
      numberCell(maybe(limits.determination.value, 3)),
      unit,
      limits.determination.definition,
    ],
    [
      'ICH Q2 detection 3.3σ/b',
      numberCell(maybe(limits.ichDetection.value, 3)),
      unit,
      limits.ichDetection.definition,
    ],
    [
      'ICH Q2 quantitation 10σ/b',
      numberCell(maybe(limits.ichQuantitation.value, 3)),
      unit,
      limits.ichQuantitation.definition,
    ],
  ];
  if (gas.zeroGasLimit !== undefined)
    rows.push([
      'zero-gas limit',
      numberCell(formatNumber(gas.zeroGasLimit.value, 3)),
      unit,
      gas.zeroGasLimit.definition,
    ]);
  return htmlTable({
    caption: `${gas.gas}: detection and determination limits (α = ${limits.alpha}, β = ${limits.beta}, k = ${limits.k})`,
    header: ['limit', numberCell('value'), 'unit', 'definition'],
    rows,
  });
}

function gasHeading(gas: GasCalibration): string {
  const feature = gas.feature;
  const where =
    feature === undefined
      ? 'from tabulated responses'
      : `${feature.response === 'area' ? 'band area' : 'peak height'} over ${formatWindow(feature.band)}${feature.baseline.length > 0 ? `, baseline of order ${feature.baselineOrder} through ${feature.baseline.map(formatWindow).join(', ')}` : ', no baseline correction'}`;
  return paragraph(
    `${where}; curve: ${CURVE_WORDS[gas.model.form]}, ${gas.model.weights === 'none' ? 'unweighted' : `weighted ${gas.model.weights}`}.`,
  );
}

function concentrationColumns(calibration: Calibration): { gas: string; unit: string }[] {
  if (calibration.cls !== undefined)
    return calibration.cls.model.components.map((c) => ({ gas: c.name, unit: c.unit }));
  return calibration.gases.map((g) => ({ gas: g.gas, unit: unitLabel(g.unit) }));
}

function standardsTable(calibration: Calibration, spectrumStatus: (index: number) => string): string {
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
    { text: standard.scan, className: 'hash' },
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

function clsSection(calibration: Calibration): string {
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
      `Every component is fitted together over the regions (K-matrix classical least squares); the baseline polynomials are projected out of every spectrum. Interferents are modelled but not reported. Ranges and detection limits (LOD) are at the reference conditions: the LOD is 3.3 × the prediction standard error of a blank, and a sample's limit is this ÷ its φ. RMSECV is the root-mean-square error of leave-one-out cross-validation over the standards; the interval inflation is the factor the prediction intervals are widened by so that they cover those errors.`,
    ) +
    components +
    facts
  );
}

/** An ISO time as `YYYY-MM-DD HH:MM` (UTC), or the text as given when it is not a time. */
function minuteText(iso: string): string {
  const ms = Date.parse(iso);
  return Number.isFinite(ms) ? new Date(ms).toISOString().slice(0, 16).replace('T', ' ') : iso;
}

const STATUS_WORDS: Record<InputFileStatus, string> = {
  unchanged: 'present, SHA-256 matches',
  changed: 'CHANGED since the calibration was built (SHA-256 differs)',
  missing: 'MISSING',
  unreadable: 'cannot be read',
};

function provenance(input: CalibrationReportInput): string {
  const { calibration } = input;
  const rows = input.inputs.map((check): Cell[] => [
    check.role,
    { text: check.path, className: 'hash' },
    { text: check.sha256, className: 'hash' },
    `${STATUS_WORDS[check.status]}${check.currentSha256 === undefined ? '' : `; now ${check.currentSha256}`}${check.message === undefined ? '' : `; ${check.message}`}`,
  ]);
  const changed = input.inputs.filter((c) => c.status !== 'unchanged');
  const sameTool =
    calibration.tool.name === input.tool.name && calibration.tool.version === input.tool.version;
  return (
    factList([
      ['calibration file', { html: element('span', { class: 'hash' }, escapeText(input.calibrationFile)) }],
      ['calibration SHA-256', { html: element('span', { class: 'hash' }, escapeText(calibration.sha256)) }],
      ['content check', 'the recorded SHA-256 matches the calibration content (verified on load)'],
      ['schema version', calibration.schemaVersion],
      ['built', `${calibration.createdAt} by ${calibration.tool.name} ${calibration.tool.version}`],
      [
        'report made',
        `${input.generatedAt} by ${input.tool.name} ${input.tool.version}${sameTool ? '' : ' (a different version from the one that built the calibration)'}`,
      ],
      ...(input.histories?.[0]?.source === undefined
        ? []
        : ([['recheck history', input.histories[0].source]] as [string, string][])),
    ]) +
    (changed.length > 0
      ? notice(
          `${changed.length} of ${input.inputs.length} recorded input file(s) are missing or no longer match their recorded SHA-256; the numbers above come from the calibration file itself, the plots leave out what could not be verified.`,
        )
      : '') +
    htmlTable({
      caption: 'Input files (paths relative to the calibration file’s folder)',
      header: ['role', 'path', 'SHA-256 recorded', 'now'],
      rows,
    })
  );
}

function historySection(
  histories: readonly RecheckHistoryView[] | undefined,
  notes: readonly string[],
  idPrefix: string,
): { html: string; plots: NamedPlot[] } {
  const noteMarkup = notes.map((n) => notice(n)).join('');
  const views = (histories ?? []).filter((h) => h.chart.records.length > 0 || (h.rows ?? []).length > 0);
  if (views.length === 0)
    return { html: noteMarkup + paragraph('No rechecks are recorded for this calibration yet.'), plots: [] };
  const plots: NamedPlot[] = [];
  const parts = views.map((history, k) => {
    const plot = controlChartPlot(history.chart, {
      idPrefix: `${idPrefix}-${k}`,
      file: `${history.gas}-control-chart`,
    });
    plots.push(plot);
    const rows: RecheckRow[] = [
      ...(history.rows ??
        history.chart.records.map((r) => ({
          time: r.time,
          certified: Number.NaN,
          measured: Number.NaN,
          unit: '',
          recoveryPct: r.recoveryPct,
          verdict: r.verdict,
          rules: r.rules,
          scan: r.label ?? '',
        }))),
    ].sort((a, b) => Date.parse(a.time) - Date.parse(b.time));
    const shown = (value: number, digits: number): string =>
      Number.isFinite(value) ? formatNumber(value, digits) : '';
    return (
      (views.length > 1 ? element('h3', {}, escapeText(history.gas)) : '') +
      figure(
        plot.svg,
        `Control chart of ${history.gas}: recovery of the check standard against time, tolerance ±${shortNumber(history.chart.tolerancePct)} %, warning (±2σ) and action (±3σ) limits with the σ in force for the next check (σ = ${shortNumber(history.chart.sigmaPct)} %, why: below the chart); checks where a control rule fired are ringed and labelled above the chart.`,
      ) +
      (history.notes === undefined || history.notes.length === 0 ? '' : bulletList(history.notes)) +
      htmlTable({
        caption: `Rechecks of ${history.gas}`,
        header: [
          'time (UTC)',
          numberCell('certified'),
          numberCell('measured'),
          'unit',
          numberCell('recovery / %'),
          'verdict',
          'rules fired',
          'scan',
        ],
        rows: rows.map((r): Cell[] => [
          minuteText(r.time),
          numberCell(shown(r.certified, 5)),
          numberCell(shown(r.measured, 5)),
          r.unit,
          numberCell(r.recoveryPct === undefined ? 'zero gas' : shown(r.recoveryPct, 5)),
          r.verdict,
          r.rules.join(', '),
          { text: r.scan, className: 'hash' },
        ]),
        rowClasses: rows.map((r) => (r.verdict === 'fail' ? 'failed' : undefined)),
      })
    );
  });
  return { html: noteMarkup + parts.join(''), plots };
}

/**
 * The plots of a calibration report (curve, spectra, control chart), for `--plot <dir>`.
 *
 * @param input - the report input
 * @param options - axis direction, level
 * @returns named plots
 */
export function calibrationReportPlots(
  input: CalibrationReportInput,
  options: CalibrationReportOptions = {},
): NamedPlot[] {
  const plots = calibrationPlots(input.calibration, input.spectra, {
    ...options,
    idPrefix: 'plot',
    spectraNotes: input.spectraNotes,
  });
  return [...plots, ...historySection(input.histories, input.historyNotes ?? [], 'plot').plots];
}

/**
 * The calibration report page.
 *
 * @param input - calibration, what was found on disk, history
 * @param options - wavenumber axis direction, band level
 * @returns the HTML page
 * @throws BandwrightError `INVALID_VALUE` for a level outside (0, 1) or a history with impossible values
 */
export function calibrationReportHtml(
  input: CalibrationReportInput,
  options: CalibrationReportOptions = {},
): string {
  const { calibration } = input;
  const level = options.level ?? 0.95;
  const title = calibration.title ?? input.calibrationFile.replace(/^.*[\\/]/, '');
  const plots = calibrationPlots(calibration, input.spectra, {
    ...options,
    level,
    idPrefix: 'report',
    spectraNotes: input.spectraNotes,
  });
  const plotFor = (file: string): NamedPlot | undefined => plots.find((p) => p.file === file);
  const loaded = new Set(input.spectra.map((s) => s.index));
  const history = historySection(input.histories, input.historyNotes ?? [], 'report');
  const reference = calibration.reference;

  const parts: string[] = [];
  parts.push(
    element(
      'header',
      {},
      element('h1', {}, escapeText(`Calibration report: ${title}`)) +
        paragraph(
          `${concentrationColumns(calibration)
            .map((g) => g.gas)
            .join(
              ', ',
            )} · ${calibration.method.model} method · ${calibration.standards.length} standards · built ${calibration.createdAt}`,
          'subtitle',
        ),
    ),
  );
  parts.push(cautionBox(calibration.cautions));
  const gasLinks = calibration.gases.map((g) =>
    element('li', {}, element('a', { href: `#gas-${slug(g.gas)}` }, escapeText(g.gas))),
  );
  parts.push(
    element(
      'nav',
      {},
      element(
        'ol',
        {},
        [
          element('li', {}, element('a', { href: '#summary' }, 'Summary')),
          ...gasLinks,
          ...(calibration.cls === undefined
            ? []
            : [element('li', {}, element('a', { href: '#cls' }, 'Classical least squares'))]),
          element('li', {}, element('a', { href: '#standards' }, 'Standards')),
          element('li', {}, element('a', { href: '#rechecks' }, 'Recheck history')),
          element('li', {}, element('a', { href: '#provenance' }, 'Provenance')),
        ].join(''),
      ),
    ),
  );

  const summaryFacts: [string, string][] = [
    [
      'gases',
      calibration.cls !== undefined
        ? calibration.cls.model.components
            .map((c) => `${c.name} (${c.unit}${c.reported ? '' : ', interferent'})`)
            .join('; ')
        : calibration.gases
            .map((g) => `${g.gas} (${unitLabel(g.unit)}, ${g.model.range[0]}–${g.model.range[1]})`)
            .join('; '),
    ],
    [
      'method',
      `${calibration.method.model}${calibration.method.model === 'band' ? ' (baseline-corrected band per gas)' : ''}`,
    ],
    ['standards', `${calibration.standards.length}`],
    [
      'reference conditions',
      `path ${formatNumber(reference.pathLength_m, 4)} m, ${formatNumber(reference.temperature_K, 5)} K, ${formatNumber(reference.pressure_kPa, 6)} kPa; responses scaled by φ = (L/L_ref)(P/P_ref)(T_ref/T)`,
    ],
    [
      'recheck',
      `every ${calibration.method.recheck.everyDays} days, tolerance ±${calibration.method.recheck.tolerancePct} %`,
    ],
    ['bands drawn at', levelText(level)],
  ];
  const verdicts = calibration.gases.map(
    (g) =>
      `${g.gas}: ${g.model.mandel === null ? 'linearity not tested (too few standards or levels)' : g.model.mandel.recommendation}; LOD ${maybe(g.model.limits.detection.value, 3)} ${unitLabel(g.unit)}`,
  );
  parts.push(
    element(
      'section',
      { id: 'summary' },
      element('h2', {}, 'Summary') +
        factList(summaryFacts) +
        bulletList(verdicts) +
        (calibration.warnings.length > 0
          ? element('h3', {}, 'Warnings') + bulletList(calibration.warnings)
          : '') +
        input.spectraNotes.map((n) => notice(n)).join(''),
    ),
  );

  for (const gas of calibration.gases) {
    const name = slug(gas.gas);
    const curve = plotFor(`${name}-calibration-curve.svg`);
    const spectra = plotFor(`${name}-standard-spectra.svg`);
    const figures: string[] = [];
    if (curve !== undefined)
      figures.push(
        figure(
          curve.svg,
          `${gas.gas}: standards (responses at reference conditions) and the fitted curve with its ${levelText(level)} confidence and prediction bands; detection (LOD) and determination (LOQ) limits as vertical lines; residuals below.`,
        ),
      );
    if (spectra !== undefined)
      figures.push(
        figure(
          spectra.svg,
          `${gas.gas}: the standards' absorbance spectra (grouped by certified concentration), band window shaded, baseline windows hatched, each standard's fitted baseline dotted.`,
        ),
      );
    else if (gas.feature !== undefined)
      figures.push(
        notice(
          `${gas.gas}: no standard spectrum could be read and verified, so the spectra plot is left out.`,
        ),
      );
    for (const warning of gas.model.warnings) figures.push(notice(warning));
    parts.push(
      element(
        'section',
        { id: `gas-${name}` },
        element('h2', {}, escapeText(gas.gas)) +
          gasHeading(gas) +
          statisticsTable(gas) +
          linearityText(gas) +
          limitsTable(gas) +
          figures.join(''),
      ),
    );
  }

  if (calibration.cls !== undefined) {
    const spectra = plotFor('standard-spectra.svg');
    parts.push(
      element(
        'section',
        { id: 'cls' },
        element('h2', {}, 'Classical least squares') +
          clsSection(calibration) +
          (spectra === undefined
            ? notice('No standard spectrum could be read and verified, so the spectra plot is left out.')
            : figure(
                spectra.svg,
                "The standards' absorbance spectra over the method's fit regions (shaded), grouped by their certified concentrations.",
              )),
      ),
    );
  }

  const spectrumStatus = (index: number): string =>
    loaded.has(index) ? 'read, hash matches' : calibration.method.model === 'responses' ? '—' : 'not drawn';
  parts.push(
    element(
      'section',
      { id: 'standards' },
      element('h2', {}, 'Standards') + standardsTable(calibration, spectrumStatus),
    ),
  );
  parts.push(element('section', { id: 'rechecks' }, element('h2', {}, 'Recheck history') + history.html));
  parts.push(element('section', { id: 'provenance' }, element('h2', {}, 'Provenance') + provenance(input)));
  parts.push(cautionBox(calibration.cautions, 'safety-end'));
  parts.push(
    element(
      'footer',
      {},
      escapeText(
        `${input.tool.name} ${input.tool.version} · report made ${input.generatedAt} · calibration SHA-256 ${calibration.sha256}`,
      ),
    ),
  );
  return htmlPage({ title: `Calibration report: ${title}`, body: parts.join('\n') });
}
