/**
 * Writing the files commands make besides their results, in one place: refusing an existing output
 * before any work is done, plots as SVG files (`calibrate --plot`, `quantify --plot`,
 * `recheck --plot`, `report --plot`), and the `quantify --report` page.
 */
import { join } from 'node:path';
import type { Calibration } from '../calibration/calibration.js';
import type { QuantifyOptions } from '../calibration/quantify.js';
import { BandwrightError } from '../errors.js';
import { quantifyReportHtml, quantifyReportPlots, type SampleSpectrum } from '../report/html-quantify.js';
import type { BatchEntry } from '../report/results.js';
import { svgFile } from '../report/svg/chart.js';
import type { NamedPlot } from '../report/svg/plot-set.js';
import type { WavenumberAxis } from '../report/svg/spectra.js';
import { writeFileAtomic } from '../store/atomic-write.js';
import { isOccupied } from '../store/folders.js';
import { TOOL } from '../version.js';
import { note, type CommandContext } from './context.js';
import { creationTime } from './parse.js';

/**
 * Refuses early when an output file exists and `force` is off (before any work is done).
 *
 * @param path - output path
 * @param force - whether replacing is allowed
 * @param option - option name for the message
 * @throws BandwrightError `FILE_EXISTS` naming the file
 */
export function refuseExisting(path: string, force: boolean, option: string): void {
  if (!force && isOccupied(path))
    throw new BandwrightError('FILE_EXISTS', `${path} exists; use --force to replace it`, {
      file: path,
      parameter: option,
    });
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
  const existing = plots.map((plot) => join(folder, plot.file)).find((path) => isOccupied(path));
  if (existing !== undefined)
    throw new BandwrightError(
      'FILE_EXISTS',
      `${existing} exists; use --force to replace the plots in ${folder}`,
      { file: existing, parameter: '--plot' },
    );
}

/**
 * Writes plots as SVG files into a folder (created when missing). Refuses before writing anything
 * when a file exists and `force` is off, so a refusal leaves the folder as it was.
 *
 * @param folder - destination folder
 * @param plots - plots with unique file names
 * @param options - `force` to replace existing files
 * @returns the paths written
 * @throws BandwrightError `FILE_EXISTS` naming the first existing file; `FILE_READ` when the folder
 *   cannot be written
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

/** What {@link writeQuantifyReport} writes from. */
export interface QuantifyReportRequest {
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
      `corrected to ${options.oxygen.reference_pct} % O2 (measured ${options.oxygen.measured_pct} %, ` +
        `air ${options.oxygen.air_pct ?? 20.9} %)`,
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
 * @param request - results, spectra and destinations
 * @throws BandwrightError `FILE_EXISTS`; `FILE_READ` when a folder cannot be written
 */
export function writeQuantifyReport(context: CommandContext, request: QuantifyReportRequest): void {
  const input = {
    calibration: request.calibration,
    calibrationFile: request.calibrationPath,
    entries: request.entries,
    level: request.options.level ?? 0.95,
    spectra: request.spectra,
    generatedAt: creationTime(),
    tool: { name: TOOL.name, version: TOOL.version },
    options: reportingWords(request.options),
  };
  const plots =
    request.plot === undefined ? [] : quantifyReportPlots(input, { wavenumberAxis: request.wavenumberAxis });
  if (request.report !== undefined) refuseExisting(request.report, request.force, '--report');
  if (request.plot !== undefined) refuseExistingPlots(request.plot, plots, request.force);
  if (request.report !== undefined) {
    writeFileAtomic(request.report, quantifyReportHtml(input, { wavenumberAxis: request.wavenumberAxis }), {
      overwrite: request.force,
      createFolder: true,
    });
    note(context, `report written to ${request.report}`);
  }
  if (request.plot !== undefined) {
    const written = writePlotFiles(request.plot, plots, { force: true });
    note(context, `${written.length} plot(s) written to ${request.plot}`);
  }
}
