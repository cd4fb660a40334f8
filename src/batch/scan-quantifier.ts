/**
 * The work done for one scan of a batch, the same in this thread and in a worker thread, so a
 * batch gives identical results either way: read the file, quantify it, turn a bad scan into a
 * failure entry instead of an exception, and write the scan's lines for the result files.
 *
 * The lines are made where the scan is quantified: a worker then sends a few hundred bytes of
 * text per scan instead of the whole entry, and the writing thread, which no longer rebuilds
 * every entry from a message, stays small over a long batch (bench/batch.ts).
 */
// Direct module imports rather than the public index: a worker thread loads only what it runs.
import type { Calibration } from '../calibration/calibration.js';
import { quantifyScan, type QuantifyOptions } from '../calibration/quantify.js';
import { BandwrightError, type ParameterNames } from '../errors.js';
import { formatCsv } from '../formats/csv-table.js';
import { createScanReader, type ScanReader } from './scan-reader.js';
import type { SampleSpectrum } from '../report/html-quantify.js';
import { isFailure, resultRow, type BatchEntry, type ResultCsvLayout } from '../report/results.js';
import { readWarnings } from '../calibration/result.js';
import type { Spectrum, YKind } from '../spectrum/spectrum.js';

/** Gases as result columns: name and unit, in calibration order. */
export type ResultGases = readonly { gas: string; unit: string }[];

/**
 * A result-file line made for every scan: a results CSV row (with the `warnings` column unless
 * `warningsColumn` is false, for appending to a file made before that column) or a JSON-lines record.
 */
export type LineFormat =
  | { kind: 'csv'; gases: ResultGases; sha256: string; warningsColumn?: boolean }
  | { kind: 'jsonl'; sha256: string };

/** Everything a batch needs besides the paths; plain data, so it can be sent to a worker. */
export interface BatchSetup {
  /** The verified calibration. */
  calibration: Calibration;
  /** Quantify options (level, conditions, reporting). */
  options: QuantifyOptions;
  /** What y is in scans that do not declare it. */
  yKind?: YKind;
  /** The lines to make for each scan, in this order (default none). */
  lineFormats?: readonly LineFormat[];
  /** Whether each item carries its whole entry, for outputs that need more than lines (default false). */
  keepEntries?: boolean;
  /**
   * Whether each item carries the spectrum read, for reports and plots (default false). Such
   * spectra own their arrays, so a batch that keeps them runs in this thread only.
   */
  keepSpectra?: boolean;
  /** The caller's names for the core's parameters, in the reasons of failed scans. */
  parameterNames?: ParameterNames;
}

/** What the batch hands on for one scan. */
export interface BatchItem {
  /** The reason, when the scan could not be read or quantified. */
  error?: string;
  /** The scan's line for each of the setup's `lineFormats`, in that order. */
  lines: string[];
  /** The entry, when the setup keeps entries. */
  entry?: BatchEntry;
  /** The scan as named and the spectrum read (also when it could not be quantified), when the setup keeps spectra. */
  sample?: SampleSpectrum;
}

/** Quantifies one path at a time with a reader of its own (one per thread). */
export type ScanQuantifier = (path: string) => BatchItem;

/**
 * One results CSV row, exactly as `resultsCsv` writes it.
 *
 * @param entry - result or failure
 * @param gases - gases in column order
 * @param sha256 - the calibration's hash
 * @param layout - whether the row ends with the `warnings` column (default true)
 */
export function resultsCsvRow(
  entry: BatchEntry,
  gases: ResultGases,
  sha256: string,
  layout: ResultCsvLayout = {},
): string {
  // formatCsv with no columns writes an empty header line; the rest is the row as resultsCsv writes it.
  return formatCsv([], [resultRow(entry, gases, sha256, layout)]).slice(1);
}

/**
 * One JSON-lines record: the entry of `quantify --json`'s `results` with the calibration's hash,
 * so a line can be traced on its own.
 *
 * @param entry - result or failure
 * @param sha256 - the calibration's hash
 */
export function resultsJsonLine(entry: BatchEntry, sha256: string): string {
  return `${JSON.stringify({ ...entry, calibrationSha256: sha256 })}\n`;
}

/**
 * A scan's line in one format.
 *
 * @param entry - result or failure
 * @param format - CSV row or JSON-lines record
 */
export function formatLine(entry: BatchEntry, format: LineFormat): string {
  return format.kind === 'csv'
    ? resultsCsvRow(entry, format.gases, format.sha256, { warningsColumn: format.warningsColumn !== false })
    : resultsJsonLine(entry, format.sha256);
}

/**
 * The item of one entry: its line in each of the setup's formats, its failure reason, and the
 * entry itself when the setup keeps entries.
 *
 * @param entry - result or failure
 * @param setup - line formats and whether to keep entries
 */
export function batchItem(
  entry: BatchEntry,
  setup: Pick<BatchSetup, 'lineFormats' | 'keepEntries'>,
): BatchItem {
  const item: BatchItem = { lines: (setup.lineFormats ?? []).map((format) => formatLine(entry, format)) };
  if (isFailure(entry)) item.error = entry.error;
  if (setup.keepEntries === true) item.entry = entry;
  return item;
}

/**
 * Makes the per-scan function of a batch.
 *
 * @param setup - calibration, options, y-kind, line formats, whether to keep entries and spectra
 * @returns a function from a scan path to its item; a scan that cannot be read or quantified
 *   gives an item with the reason (and an error line in every format)
 * @throws Error (from the returned function) only for faults that are not about the scan (bugs)
 */
export function createScanQuantifier(setup: BatchSetup): ScanQuantifier {
  const keepSpectra = setup.keepSpectra === true;
  // Each spectrum is quantified before the next is read, so the readers' buffers can be reused,
  // unless the spectra are kept.
  const read: ScanReader = createScanReader({
    reuseOutput: !keepSpectra,
    ...(setup.yKind === undefined ? {} : { yKind: setup.yKind }),
  });
  return (path: string): BatchItem => {
    let entry: BatchEntry;
    let spectrum: Spectrum | undefined;
    try {
      spectrum = read(path);
      entry = quantifyScan(setup.calibration, spectrum, setup.options);
    } catch (error) {
      if (!(error instanceof BandwrightError)) throw error;
      entry = { scan: path, error: error.describe(setup.parameterNames) };
      // A scan read with warnings that then failed keeps them: they often say why.
      const warnings = readWarnings(spectrum?.metadata.warnings);
      if (warnings.length > 0) entry.warnings = warnings;
    }
    const item = batchItem(entry, setup);
    if (keepSpectra && spectrum !== undefined) item.sample = { scan: path, spectrum };
    return item;
  };
}
