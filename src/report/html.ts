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
import type { Calibration, CalibrationInput } from '../calibration/calibration.js';
import { unitLabel } from '../gas/units.js';
import {
  bulletList,
  cautionBox,
  factList,
  figure,
  hashCell,
  hashValue,
  htmlPage,
  htmlTable,
  levelText,
  notice,
  numberCell,
  pageFooter,
  pageHeader,
  pageSection,
  paragraph,
  type Cell,
} from './html-page.js';
import { element, escapeText, fileName, slug } from './svg/markup.js';
import { calibrationPlots, controlChartPlot, type NamedPlot, type StandardSpectrum } from './svg/plot-set.js';
import type { ControlChartInput } from './svg/control-chart.js';
import {
  clsSection,
  concentrationColumns,
  gasHeading,
  limitsTable,
  linearityText,
  maybe,
  standardsTable,
  statisticsTable,
} from './html-calibration.js';
import type { WavenumberAxis } from './svg/spectra.js';
import { formatNumber } from './table.js';
import { significantDigits } from '../words.js';

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
    hashCell(check.path),
    hashCell(check.sha256),
    `${STATUS_WORDS[check.status]}` +
      `${check.currentSha256 === undefined ? '' : `; now ${check.currentSha256}`}` +
      `${check.message === undefined ? '' : `; ${check.message}`}`,
  ]);
  const changed = input.inputs.filter((c) => c.status !== 'unchanged');
  const sameTool =
    calibration.tool.name === input.tool.name && calibration.tool.version === input.tool.version;
  return (
    factList([
      ['calibration file', hashValue(input.calibrationFile)],
      ['calibration SHA-256', hashValue(calibration.sha256)],
      ['content check', 'the recorded SHA-256 matches the calibration content (verified on load)'],
      ['schema version', calibration.schemaVersion],
      ['built', `${calibration.createdAt} by ${calibration.tool.name} ${calibration.tool.version}`],
      [
        'report made',
        `${input.generatedAt} by ${input.tool.name} ${input.tool.version}` +
          `${sameTool ? '' : ' (a different version from the one that built the calibration)'}`,
      ],
      ...(input.histories?.[0]?.source === undefined
        ? []
        : ([['recheck history', input.histories[0].source]] as [string, string][])),
    ]) +
    (changed.length > 0
      ? notice(
          `${changed.length} of ${input.inputs.length} recorded input file(s) are missing ` +
            `or no longer match their recorded SHA-256; ` +
            `the numbers above come from the calibration file itself, ` +
            `the plots leave out what could not be verified.`,
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
        `Control chart of ${history.gas}: recovery of the check standard against time, ` +
          `tolerance ±${significantDigits(history.chart.tolerancePct, 3)} %, ` +
          `warning (±2σ) and action (±3σ) limits with the σ in force for the next check ` +
          `(σ = ${significantDigits(history.chart.sigmaPct, 3)} %, why: below the chart); ` +
          `checks where a control rule fired are ringed and labelled above the chart` +
          (history.chart.cusum === undefined
            ? '.'
            : `. Under it, the CUSUM chart: C⁺ upwards and C⁻ downwards in units of σ, with the ` +
              `decision interval ±h = ±${significantDigits(history.chart.cusum.h, 3)}σ ` +
              `(k = ${significantDigits(history.chart.cusum.k, 3)}σ); a sum beyond it is marked.`),
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
          hashCell(r.scan),
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
  const title = calibration.title ?? fileName(input.calibrationFile);
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
  const gasNames = concentrationColumns(calibration)
    .map((g) => g.gas)
    .join(', ');
  parts.push(
    pageHeader(
      `Calibration report: ${title}`,
      `${gasNames} · ${calibration.method.model} method · ${calibration.standards.length} standards · ` +
        `built ${calibration.createdAt}`,
    ),
  );
  parts.push(cautionBox(calibration.cautions));
  const navItem = (target: string, text: string): string =>
    element('li', {}, element('a', { href: `#${target}` }, escapeText(text)));
  parts.push(
    element(
      'nav',
      {},
      element(
        'ol',
        {},
        [
          navItem('summary', 'Summary'),
          ...calibration.gases.map((g) => navItem(`gas-${slug(g.gas)}`, g.gas)),
          ...(calibration.cls === undefined ? [] : [navItem('cls', 'Classical least squares')]),
          navItem('standards', 'Standards'),
          navItem('rechecks', 'Recheck history'),
          navItem('provenance', 'Provenance'),
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
      `path ${formatNumber(reference.pathLength_m, 4)} m, ${formatNumber(reference.temperature_K, 5)} K, ` +
        `${formatNumber(reference.pressure_kPa, 6)} kPa; responses scaled by φ = (L/L_ref)(P/P_ref)(T_ref/T)`,
    ],
    [
      'recheck',
      `every ${calibration.method.recheck.everyDays} days, tolerance ±${calibration.method.recheck.tolerancePct} %`,
    ],
    ['bands drawn at', levelText(level)],
  ];
  const verdicts = calibration.gases.map(
    (g) =>
      `${g.gas}: ` +
      `${
        g.model.mandel === null
          ? 'linearity not tested (too few standards or levels)'
          : g.model.mandel.recommendation
      }` +
      `; LOD ${maybe(g.model.limits.detection.value, 3)} ${unitLabel(g.unit)}`,
  );
  parts.push(
    pageSection(
      'summary',
      'Summary',
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
          `${gas.gas}: standards (responses at reference conditions) and the fitted curve ` +
            `with its ${levelText(level)} confidence and prediction bands; ` +
            `detection (LOD) and determination (LOQ) limits as vertical lines; residuals below.`,
        ),
      );
    if (spectra !== undefined)
      figures.push(
        figure(
          spectra.svg,
          `${gas.gas}: the standards' absorbance spectra (grouped by certified concentration), ` +
            `band window shaded, baseline windows hatched, each standard's fitted baseline dotted.`,
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
      pageSection(
        `gas-${name}`,
        gas.gas,
        gasHeading(gas) + statisticsTable(gas) + linearityText(gas) + limitsTable(gas) + figures.join(''),
      ),
    );
  }

  if (calibration.cls !== undefined) {
    const spectra = plotFor('standard-spectra.svg');
    parts.push(
      pageSection(
        'cls',
        'Classical least squares',
        clsSection(calibration) +
          (spectra === undefined
            ? notice('No standard spectrum could be read and verified, so the spectra plot is left out.')
            : figure(
                spectra.svg,
                "The standards' absorbance spectra over the method's fit regions (shaded), " +
                  'grouped by their certified concentrations.',
              )),
      ),
    );
  }

  const spectrumStatus = (index: number): string =>
    loaded.has(index) ? 'read, hash matches' : calibration.method.model === 'responses' ? '—' : 'not drawn';
  parts.push(pageSection('standards', 'Standards', standardsTable(calibration, spectrumStatus)));
  parts.push(pageSection('rechecks', 'Recheck history', history.html));
  parts.push(pageSection('provenance', 'Provenance', provenance(input)));
  parts.push(cautionBox(calibration.cautions, 'safety-end'));
  parts.push(
    pageFooter(
      `${input.tool.name} ${input.tool.version} · report made ${input.generatedAt} · ` +
        `calibration SHA-256 ${calibration.sha256}`,
    ),
  );
  return htmlPage({ title: `Calibration report: ${title}`, body: parts.join('\n') });
}
