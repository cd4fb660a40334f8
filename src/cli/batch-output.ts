/**
 * Where the entries of a batch go, one at a time as they come: a results CSV or JSON-lines file
 * (through the streaming results writer), the terminal table, or the `--json` document on stdout.
 * Each output holds at most one page of entries, so memory stays flat in the number of scans,
 * and each gives the same text as the whole-batch formatters of `report/results.ts`.
 */
import { formatCsv, formatResultsText, openResultsWriter, resultColumns, resultRow, resultsDocument, type BatchEntry, type ResultsWriter } from '../index.js';
import type { TextSink } from './context.js';

/** One output of a batch. */
export interface EntrySink {
  /** Takes the next entry (input order). */
  add(entry: BatchEntry): void;
  /** Completes the output (closing text, rename into place). */
  finish(): void;
  /** Gives up (removes a temporary file); safe to call after a failed finish. */
  abort(): void;
  /** A line for the user once finished (e.g. where results were written), or undefined. */
  readonly doneMessage?: string;
}

/** Gases as result columns: name and unit, in calibration order. */
export type ResultGases = readonly { gas: string; unit: string }[];

/** The header line of a results CSV for these gases. */
export function resultsCsvHeader(gases: ResultGases): string {
  return formatCsv(resultColumns(gases), []);
}

/**
 * One results CSV row, exactly as `resultsCsv` writes it.
 *
 * @param entry - result or failure
 * @param gases - gases in column order
 * @param sha256 - the calibration's hash
 */
export function resultsCsvRow(entry: BatchEntry, gases: ResultGases, sha256: string): string {
  // formatCsv with no columns writes an empty header line; the rest is the row as resultsCsv writes it.
  return formatCsv([], [resultRow(entry, gases, sha256)]).slice(1);
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

/** Options shared by the file outputs. */
export interface FileSinkOptions {
  /** `replace` (batch: temporary file renamed at the end) or `append` (watch). */
  mode: 'replace' | 'append';
  /** Replace an existing file (replace mode). */
  overwrite?: boolean;
}

/**
 * A results CSV written as entries come.
 *
 * @param path - the CSV file
 * @param gases - gases in column order
 * @param sha256 - the calibration's hash
 * @param options - mode and overwrite
 * @throws BandwrightError from {@link openResultsWriter}
 */
export function csvFileSink(path: string, gases: ResultGases, sha256: string, options: FileSinkOptions): EntrySink & { writer: ResultsWriter } {
  const writer = openResultsWriter(path, { mode: options.mode, header: resultsCsvHeader(gases), overwrite: options.overwrite === true, createFolder: true });
  return {
    writer,
    add: (entry) => writer.write(resultsCsvRow(entry, gases, sha256)),
    finish: () => writer.commit(),
    abort: () => writer.abort(),
    doneMessage: `results written to ${path}`,
  };
}

/**
 * A JSON-lines results file written as entries come.
 *
 * @param path - the file
 * @param sha256 - the calibration's hash
 * @param options - mode and overwrite
 * @throws BandwrightError from {@link openResultsWriter}
 */
export function jsonLinesFileSink(path: string, sha256: string, options: FileSinkOptions): EntrySink & { writer: ResultsWriter } {
  const writer = openResultsWriter(path, { mode: options.mode, overwrite: options.overwrite === true, createFolder: true });
  return {
    writer,
    add: (entry) => writer.write(resultsJsonLine(entry, sha256)),
    finish: () => writer.commit(),
    abort: () => writer.abort(),
    doneMessage: `results written to ${path}`,
  };
}

/** Scans per page of the terminal table: a batch up to this size prints one table, as before. */
export const TABLE_PAGE_SCANS = 500;

/**
 * The terminal table, printed a page at a time; a batch of at most `pageScans` scans prints exactly
 * the one table `formatResultsText` gives for all of it, longer batches one such table per page,
 * separated by a blank line.
 *
 * @param out - standard output
 * @param level - interval level, for the header
 * @param pageScans - scans per page (default {@link TABLE_PAGE_SCANS})
 */
export function textTableSink(out: TextSink, level: number, pageScans: number = TABLE_PAGE_SCANS): EntrySink {
  let page: BatchEntry[] = [];
  let pages = 0;
  const print = (): void => {
    if (page.length === 0) return;
    out.write(`${pages > 0 ? '\n' : ''}${formatResultsText(page, level)}\n`);
    pages++;
    page = [];
  };
  return {
    add(entry) {
      page.push(entry);
      if (page.length >= pageScans) print();
    },
    finish: print,
    abort: () => {
      page = [];
    },
  };
}

/**
 * The `quantify --json` document streamed entry by entry; the text is byte for byte what
 * `JSON.stringify(resultsDocument(entries, calibration, level), null, 2)` gives, plus a line break.
 *
 * @param out - standard output
 * @param calibration - the calibration's file and hash
 * @param level - interval level
 */
export function jsonDocumentSink(out: TextSink, calibration: { file: string; sha256: string }, level: number): EntrySink {
  const empty = JSON.stringify(resultsDocument([], calibration, level), null, 2);
  // The document ends with `"results": []\n}`; entries go between the brackets.
  const open = empty.lastIndexOf('[]');
  const head = empty.slice(0, open + 1);
  let count = 0;
  let finished = false;
  const finish = (): void => {
    if (finished) return;
    finished = true;
    out.write(count === 0 ? `${empty}\n` : '\n  ]\n}\n');
  };
  return {
    add(entry) {
      const text = JSON.stringify(entry, null, 2).replace(/\n/g, '\n    ');
      out.write(`${count === 0 ? `${head}\n` : ',\n'}    ${text}`);
      count++;
    },
    finish,
    // Standard output cannot be taken back; close the document so it stays valid JSON.
    abort: finish,
  };
}
