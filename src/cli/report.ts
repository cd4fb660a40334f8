/**
 * `bandwright report <calibration>`: one self-contained HTML page for a calibration, made from
 * what is on disk: the recorded inputs checked against their SHA-256, the standards' spectra that
 * still match, and the recheck history beside the calibration.
 */
import { basename, dirname, extname, join, resolve } from 'node:path';
import type { Command } from 'commander';
import type { Calibration } from '../calibration/calibration.js';
import { evaluateHistory } from '../drift/evaluate.js';
import { scheduleFor } from '../drift/schedule.js';
import { BandwrightError } from '../errors.js';
import {
  calibrationReportHtml,
  calibrationReportPlots,
  type CalibrationReportInput,
  type InputCheck,
  type RecheckHistoryView,
} from '../report/html.js';
import { controlChartFromEvaluation } from '../report/svg/control-chart-data.js';
import type { StandardSpectrum } from '../report/svg/plot-set.js';
import { writeFileAtomic } from '../store/atomic-write.js';
import { readCalibration } from '../store/calibration-file.js';
import { historyPathFor, readHistoryIfExists } from '../store/history.js';
import { readScan } from '../store/scan-file.js';
import { checkInputs, recordedInputPath } from '../store/verify.js';
import { TOOL } from '../version.js';
import { note, type CommandContext } from './context.js';
import { CLI_PARAMETER_NAMES } from './parameter-names.js';
import { levelOption, wavenumberAxisOption } from './options.js';
import { refuseExisting, refuseExistingPlots, writePlotFiles } from './output-files.js';
import { creationTime } from './parse.js';

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
      `the calibration records ${standardChecks.length} standard scan file(s) ` +
        `for ${calibration.standards.length} standards, ` +
        'so the spectra cannot be matched to the standards and are not drawn',
    );
    return { spectra, notes };
  }
  const problems: string[] = [];
  standardChecks.forEach((check, index) => {
    if (check.status !== 'unchanged') {
      const why =
        check.status === 'changed'
          ? 'changed since the calibration was built'
          : check.status === 'missing'
            ? 'missing'
            : `unreadable: ${check.message ?? ''}`;
      problems.push(`${check.path} (${why})`);
      return;
    }
    try {
      spectra.push({ index, spectrum: readScan(recordedInputPath(calibrationPath, check.path)) });
    } catch (error) {
      if (!(error instanceof BandwrightError)) throw error;
      problems.push(`${check.path} (cannot be read: ${error.describe(CLI_PARAMETER_NAMES)})`);
    }
  });
  if (problems.length > 0)
    notes.push(
      `${problems.length} of ${standardChecks.length} standard spectra are not drawn: ${problems.join('; ')}`,
    );
  return { spectra, notes };
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
        `${path} belongs to another calibration (sha256 ${history.calibrationSha256.slice(0, 12)}…, ` +
          `this one ${calibration.sha256.slice(0, 12)}…); its checks are not shown`,
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
        evaluation.cusum.summary,
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
    history = {
      views: [],
      notes: [`the recheck history could not be read: ${error.describe(CLI_PARAMETER_NAMES)}`],
    };
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
      'write one self-contained HTML page for a calibration: ' +
        'statistics, limits, plots, recheck history, provenance, cautions',
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
      const level = levelOption(flags.level);
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
          `note: ${changed.length} recorded input file(s) are missing or changed: ` +
            changed
              .map((c) => `${resolve(recordedInputPath(calibrationPath, c.path))} (${c.status})`)
              .join(', '),
        );
      if (flags.plot !== undefined) {
        const written = writePlotFiles(flags.plot, plots, { force: true });
        note(context, `${written.length} plot(s) written to ${flags.plot}`);
      }
    });
}
