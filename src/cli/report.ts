/**
 * `bandwright report <calibration>`: one self-contained HTML page for a calibration, and the
 * helpers `calibrate --plot`, `quantify --plot/--report` and `recheck --plot` share: checking the
 * recorded inputs against their SHA-256, re-reading the standards' spectra that still match,
 * writing plots as SVG files and reports atomically.
 */
import { basename, dirname, extname, join, resolve } from 'node:path';
import type { Command } from 'commander';
import {
  BandwrightError,
  calibrationReportHtml,
  isNonEmptyFolder,
  calibrationReportPlots,
  readCalibration,
  readScan,
  checkInputs,
  recordedInputPath,
  svgFile,
  TOOL,
  writeFileAtomic,
  type Calibration,
  type CalibrationReportInput,
  type InputCheck,
  type NamedPlot,
  type QuantifyOptions,
  type BatchEntry,
  type SampleSpectrum,
  quantifyReportHtml,
  quantifyReportPlots,
  type RecheckHistoryView,
  type DriftEvaluation,
  controlChartFromEvaluation,
  controlChartPlot,
  evaluateHistory,
  historyPathFor,
  readHistoryIfExists,
  scheduleFor,
  type StandardSpectrum,
  type WavenumberAxis,
} from '../index.js';
import { note, type CommandContext } from './context.js';
import { creationTime, parseNumberOption } from './parse.js';

/** Values of `--wavenumber-axis`. */
export const WAVENUMBER_AXIS_CHOICES: readonly WavenumberAxis[] = ['descending', 'ascending'];

/**
 * Parses `--wavenumber-axis`.
 *
 * @param text - option value (`descending`: high wavenumbers on the left; `ascending`)
 * @throws BandwrightError `USAGE` for another value
 */
export function wavenumberAxisOption(text: string | undefined): WavenumberAxis {
  if (text === undefined) return 'descending';
  if (!(WAVENUMBER_AXIS_CHOICES as readonly string[]).includes(text)) {
    throw new BandwrightError(
      'USAGE',
      `--wavenumber-axis = ${JSON.stringify(text)}, must be descending (high wavenumbers on the left) or ascending`,
      { parameter: '--wavenumber-axis' },
    );
  }
  return text as WavenumberAxis;
}

/**
 * Re-reads the standards' spectra whose files still match their recorded SHA-256. The i-th
 * `standard` input belongs to the i-th standard (the order calibrate records them in).
 *
 * @param calibration - the calibration
 * @param calibrationPath - its file as named
 * @param checks - the input checks from `checkInputs`
 * @returns spectra by standard index, and notes about those that could not be used
 */
export function loadRecordedStandards(
  calibration: Calibration,
  calibrationPath: string,
  checks: readonly InputCheck[],
): { spectra: StandardSpectrum[]; notes: string[] } {
  const standardChecks = checks.filter((c) => c.role === 'standard');
  const spectra: StandardSpectrum[] = [];
  const notes: string[] = [];
  if (calibration.method.model === 'responses') return { spectra, notes };
  if (standardChecks.length !== calibration.standards.length) {
    notes.push(
      `the calibration records ${standardChecks.length} standard scan file(s) for ${calibration.standards.length} standards, so the spectra cannot be matched to the standards and are not drawn`,
    );
    return { spectra, notes };
  }
  const problems: string[] = [];
  standardChecks.forEach((check, index) => {
    if (check.status !== 'unchanged') {
      problems.push(
        `${check.path} (${check.status === 'changed' ? 'changed since the calibration was built' : check.status === 'missing' ? 'missing' : `unreadable: ${check.message ?? ''}`})`,
      );
      return;
    }
    try {
      spectra.push({ index, spectrum: readScan(recordedInputPath(calibrationPath, check.path)) });
    } catch (error) {
      if (!(error instanceof BandwrightError)) throw error;
      problems.push(`${check.path} (cannot be read: ${error.message})`);
    }
  });
  if (problems.length > 0)
    notes.push(
      `${problems.length} of ${standardChecks.length} standard spectra are not drawn: ${problems.join('; ')}`,
    );
  return { spectra, notes };
}

/**
 * Writes plots as SVG files into a folder (created when missing). Refuses before writing anything
 * when a file exists and `force` is off, so a refusal leaves the folder as it was.
 *
 * @param folder - destination folder
 * @param plots - plots with unique file names
 * @param options - `force` to replace existing files
 * @returns the paths written
 * @throws BandwrightError `FILE_EXISTS` naming the first existing file; `FILE_READ` when the folder cannot be written
 */
export function writePlotFiles(
  folder: string,
  plots: readonly NamedPlot[],
  options: { force?: boolean } = {},
): string[] {
  const paths = plots.map((plot) => join(folder, plot.file));
  refuseExistingPlots(folder, plots, options.force === true);
  plots.forEach((plot, i) =>
    writeFileAtomic(paths[i] as string, svgFile(plot.svg), { overwrite: true, createFolder: true }),
  );
  return paths;
}

/**
 * Refuses when any plot file would replace an existing file and `force` is off.
 *
 * @param folder - destination folder
 * @param plots - plots to write
 * @param force - whether replacing is allowed
 * @throws BandwrightError `FILE_EXISTS` naming the first existing file
 */
export function refuseExistingPlots(folder: string, plots: readonly NamedPlot[], force: boolean): void {
  if (force) return;
  const existing = plots.map((plot) => join(folder, plot.file)).find((path) => isNonEmptyFolder(path));
  if (existing !== undefined)
    throw new BandwrightError(
      'FILE_EXISTS',
      `${existing} exists; use --force to replace the plots in ${folder}`,
      { file: existing, parameter: '--plot' },
    );
}

/**
 * Refuses early when an output file exists and `force` is off (before any work is done).
 *
 * @param path - output path
 * @param force - whether replacing is allowed
 * @param option - option name for the message
 */
export function refuseExisting(path: string, force: boolean, option: string): void {
  if (!force && isNonEmptyFolder(path))
    throw new BandwrightError('FILE_EXISTS', `${path} exists; use --force to replace it`, {
      file: path,
      parameter: option,
    });
}

/**
 * Default report path: the calibration's name without `.json`, plus `.report.html`, beside it.
 *
 * @param calibrationPath - calibration file
 */
export function defaultReportPath(calibrationPath: string): string {
  const name =
    extname(calibrationPath).toLowerCase() === '.json'
      ? basename(calibrationPath, extname(calibrationPath))
      : basename(calibrationPath);
  return join(dirname(calibrationPath), `${name}.report.html`);
}

/**
 * The recheck history of a calibration (the file beside it), evaluated per gas as `recheck`
 * evaluates it, with the schedule at `now`.
 *
 * @param calibration - verified calibration
 * @param calibrationPath - its file as named
 * @param now - time to judge the schedule at, ISO 8601
 * @returns one view per gas with checks, and notes (a history of another calibration is not used)
 * @throws BandwrightError from reading the history (`PARSE` for a damaged file)
 */
export function recheckHistoryViews(
  calibration: Calibration,
  calibrationPath: string,
  now: string,
): { views: RecheckHistoryView[]; notes: string[] } {
  const path = historyPathFor(calibrationPath);
  const history = readHistoryIfExists(path);
  if (history === undefined) return { views: [], notes: [] };
  if (history.calibrationSha256 !== calibration.sha256) {
    return {
      views: [],
      notes: [
        `${path} belongs to another calibration (sha256 ${history.calibrationSha256.slice(0, 12)}…, this one ${calibration.sha256.slice(0, 12)}…); its checks are not shown`,
      ],
    };
  }
  const gases = [...new Set(history.records.map((r) => r.gas))];
  const views = gases.map((gas): RecheckHistoryView => {
    const evaluation = evaluateHistory(history.records, { policy: calibration.method.recheck, gas });
    const schedule = scheduleFor(
      evaluation.checks.map((c) => ({ time: c.record.time, verdict: c.verdict })),
      { everyDays: calibration.method.recheck.everyDays, calibrationCreatedAt: calibration.createdAt, now },
    );
    return {
      gas,
      chart: controlChartFromEvaluation(
        evaluation,
        schedule.nextDue === undefined ? {} : { nextDue: schedule.nextDue },
      ),
      rows: evaluation.checks.map((c) => ({
        time: c.record.time,
        certified: c.record.certified,
        measured: c.record.measured,
        unit: c.record.unit,
        ...(c.recoveryPct === undefined ? {} : { recoveryPct: c.recoveryPct }),
        verdict: c.verdict,
        rules: c.rules.map((r) => r.rule),
        scan: c.record.scan,
      })),
      notes: [
        `σ: ${evaluation.sigma.reason}`,
        `trend: ${evaluation.trend.summary}`,
        `schedule at ${now}: ${schedule.reason}`,
        ...evaluation.notes,
      ],
      source: path,
    };
  });
  return { views, notes: [] };
}

/**
 * Everything the calibration report needs from disk: input checks, spectra that still match, and
 * the recheck history when there is one.
 *
 * @param calibration - verified calibration
 * @param calibrationPath - its file as named
 */
export function calibrationReportInput(
  calibration: Calibration,
  calibrationPath: string,
): CalibrationReportInput {
  const generatedAt = creationTime();
  const inputs = checkInputs(calibration, calibrationPath);
  const { spectra, notes } = loadRecordedStandards(calibration, calibrationPath, inputs);
  let history: { views: RecheckHistoryView[]; notes: string[] };
  try {
    history = recheckHistoryViews(calibration, calibrationPath, generatedAt);
  } catch (error) {
    // A damaged history must not hide the rest of the report: say so and draw what can be drawn.
    if (!(error instanceof BandwrightError)) throw error;
    history = { views: [], notes: [`the recheck history could not be read: ${error.message}`] };
  }
  return {
    calibration,
    calibrationFile: calibrationPath,
    generatedAt,
    tool: { name: TOOL.name, version: TOOL.version },
    inputs,
    spectra,
    spectraNotes: notes,
    histories: history.views,
    historyNotes: history.notes,
  };
}

/**
 * Writes the control chart of a gas's evaluated history for `recheck --plot`: the file
 * `<gas>-control-chart.svg` is regenerated from the history on every recheck, so it is replaced.
 *
 * @param context - where to print the note
 * @param folder - destination folder
 * @param evaluation - the evaluated history after the new check
 * @param nextDue - next due time, ISO, when known
 */
export function writeRecheckPlot(
  context: CommandContext,
  folder: string,
  evaluation: DriftEvaluation,
  nextDue?: string,
): void {
  const chart = controlChartFromEvaluation(evaluation, nextDue === undefined ? {} : { nextDue });
  const written = writePlotFiles(
    folder,
    [controlChartPlot(chart, { file: `${evaluation.gas}-control-chart` })],
    { force: true },
  );
  note(context, `control chart written to ${written.join(', ')}`);
}

interface ReportFlags {
  output?: string;
  force?: boolean;
  plot?: string;
  level: string;
  wavenumberAxis?: string;
}

/**
 * Registers `report` on the program.
 *
 * @param program - the commander program
 * @param context - output and status
 */
export function registerReport(program: Command, context: CommandContext): void {
  program
    .command('report')
    .description(
      'write one self-contained HTML page for a calibration: statistics, limits, plots, recheck history, provenance, cautions',
    )
    .argument('<calibration>', 'calibration file (JSON) made by calibrate')
    .option(
      '-o, --output <file>',
      'HTML file to write (default: <calibration without .json>.report.html beside it)',
    )
    .option('--force', 'replace an existing report (and plot files with --plot)')
    .option('--plot <dir>', 'also write each plot as an SVG file into this folder')
    .option('--level <p>', 'level of the confidence and prediction bands drawn', '0.95')
    .option(
      '--wavenumber-axis <order>',
      'spectra with wavenumbers descending (high on the left, default) or ascending',
    )
    .action((calibrationPath: string, flags: ReportFlags) => {
      const level = parseNumberOption(flags.level, '--level', [
        (n) => n > 0 && n < 1,
        'must be between 0 and 1, e.g. 0.95',
      ]);
      const wavenumberAxis = wavenumberAxisOption(flags.wavenumberAxis);
      const output = flags.output ?? defaultReportPath(calibrationPath);
      const force = flags.force === true;
      refuseExisting(output, force, '--output');
      const calibration = readCalibration(calibrationPath);
      const input = calibrationReportInput(calibration, calibrationPath);
      const html = calibrationReportHtml(input, { level, wavenumberAxis });
      const plots = flags.plot === undefined ? [] : calibrationReportPlots(input, { level, wavenumberAxis });
      // Refuse before writing anything, so a refusal leaves every file as it was.
      if (flags.plot !== undefined) refuseExistingPlots(flags.plot, plots, force);
      writeFileAtomic(output, html, { overwrite: force, createFolder: true });
      note(context, `report written to ${output}`);
      for (const text of input.spectraNotes) note(context, `note: ${text}`);
      const changed = input.inputs.filter((c) => c.status !== 'unchanged');
      if (changed.length > 0)
        note(
          context,
          `note: ${changed.length} recorded input file(s) are missing or changed: ${changed.map((c) => `${resolve(recordedInputPath(calibrationPath, c.path))} (${c.status})`).join(', ')}`,
        );
      if (flags.plot !== undefined) {
        const written = writePlotFiles(flags.plot, plots, { force: true });
        note(context, `${written.length} plot(s) written to ${flags.plot}`);
      }
    });
}

/** What {@link writeQuantifyOutputs} writes from. */
export interface QuantifyOutputs {
  /** The calibration used. */
  calibration: Calibration;
  /** Its file as named. */
  calibrationPath: string;
  /** Results and failures. */
  entries: readonly BatchEntry[];
  /** The scans that were read. */
  spectra: readonly SampleSpectrum[];
  /** The options the results were computed with. */
  options: QuantifyOptions;
  /** HTML report to write, if any. */
  report?: string | undefined;
  /** Folder for SVG plots, if any. */
  plot?: string | undefined;
  /** Replace existing files. */
  force: boolean;
  /** Wavenumber axis direction. */
  wavenumberAxis: WavenumberAxis;
}

/**
 * The reporting options in words, for the report's facts.
 *
 * @param options - quantify options
 */
export function reportingWords(options: QuantifyOptions): string[] {
  const words: string[] = [];
  if (options.unit !== undefined) words.push(`reported in ${options.unit}`);
  if (options.dryBasis !== undefined)
    words.push(
      options.dryBasis.waterFraction === undefined
        ? 'dry basis (water from the same scan)'
        : `dry basis (water ${(options.dryBasis.waterFraction * 100).toFixed(2)} % as given)`,
    );
  if (options.oxygen !== undefined)
    words.push(
      `corrected to ${options.oxygen.reference_pct} % O2 (measured ${options.oxygen.measured_pct} %, air ${options.oxygen.air_pct ?? 20.9} %)`,
    );
  if (options.massConcentration !== undefined)
    words.push(
      `mg/m³ at ${options.massConcentration.temperature_K} K and ${options.massConcentration.pressure_kPa} kPa`,
    );
  if (options.limits !== undefined)
    words.push(`${options.limits.length} exposure limit(s) for the over-limit flag`);
  return words;
}

/**
 * Writes `quantify --report` and `--plot`: refuses before writing anything when a file exists
 * and `force` is off.
 *
 * @param context - where to print notes
 * @param outputs - results, spectra and destinations
 * @throws BandwrightError `FILE_EXISTS`; `FILE_READ` when a folder cannot be written
 */
export function writeQuantifyOutputs(context: CommandContext, outputs: QuantifyOutputs): void {
  const input = {
    calibration: outputs.calibration,
    calibrationFile: outputs.calibrationPath,
    entries: outputs.entries,
    level: outputs.options.level ?? 0.95,
    spectra: outputs.spectra,
    generatedAt: creationTime(),
    tool: { name: TOOL.name, version: TOOL.version },
    options: reportingWords(outputs.options),
  };
  const plots =
    outputs.plot === undefined ? [] : quantifyReportPlots(input, { wavenumberAxis: outputs.wavenumberAxis });
  if (outputs.report !== undefined) refuseExisting(outputs.report, outputs.force, '--report');
  if (outputs.plot !== undefined) refuseExistingPlots(outputs.plot, plots, outputs.force);
  if (outputs.report !== undefined) {
    writeFileAtomic(outputs.report, quantifyReportHtml(input, { wavenumberAxis: outputs.wavenumberAxis }), {
      overwrite: outputs.force,
      createFolder: true,
    });
    note(context, `report written to ${outputs.report}`);
  }
  if (outputs.plot !== undefined) {
    const written = writePlotFiles(outputs.plot, plots, { force: true });
    note(context, `${written.length} plot(s) written to ${outputs.plot}`);
  }
}
