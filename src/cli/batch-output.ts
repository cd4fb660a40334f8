/**
 * Where the entries of a batch go, one at a time as they come: a results CSV or JSON-lines file
 * (rows made by `batch-scan.ts` where the scan was quantified, written through the streaming
 * results writer), the terminal table, or the `--json` document on stdout.
 * Each output holds at most one page of entries, so memory stays flat in the number of scans,
 * and each gives the same text as the whole-batch formatters of `report/results.ts`.
 */
import { formatCsv, formatResultsText, openResultsWriter, resultColumns, resultsDocument, type BatchEntry, type ResultsWriter } from '../index.js';
import type { BatchItem, ResultGases } from './batch-scan.js';
import type { TextSink } from './context.js';

/** One output of a batch. */
export interface EntrySink {
  /** Takes the next scan's item (input order). */
  add(item: BatchItem): void;
  /** Completes the output (closing text, rename into place). */
  finish(): void;
  /** Gives up (removes a temporary file); safe to call after a failed finish. */
  abort(): void;
  /** A line for the user once finished (e.g. where results were written), or undefined. */
  readonly doneMessage?: string;
}

/** The header line of a results CSV for these gases. */
export function resultsCsvHeader(gases: ResultGases): string {
  return formatCsv(resultColumns(gases), []);
}

/** The entry of an item, for the outputs that need it (the batch keeps entries for them). */
function entryOf(item: BatchItem): BatchEntry {
  if (item.entry === undefined) throw new Error('batch output needs entries but the batch was set up without keepEntries');
  return item.entry;
}

/** Options shared by the file outputs. */
export interface FileSinkOptions {
  /** `replace` (batch: temporary file renamed at the end) or `append` (watch). */
  mode: 'replace' | 'append';
  /** Replace an existing file (replace mode). */
  overwrite?: boolean;
}

/**
 * A results CSV written as rows come.
 *
 * @param path - the CSV file
 * @param gases - gases in column order (for the header)
 * @param line - which of the batch's line formats holds this file's rows (a `csv` one for these gases)
 * @param options - mode and overwrite
 * @throws BandwrightError from {@link openResultsWriter}
 */
export function csvFileSink(path: string, gases: ResultGases, line: number, options: FileSinkOptions): EntrySink & { writer: ResultsWriter } {
  const writer = openResultsWriter(path, { mode: options.mode, header: resultsCsvHeader(gases), overwrite: options.overwrite === true, createFolder: true });
  return {
    writer,
    add: (item) => writer.write(item.lines[line] as string),
    finish: () => writer.commit(),
    abort: () => writer.abort(),
    doneMessage: `results written to ${path}`,
  };
}

/**
 * A JSON-lines results file written as records come.
 *
 * @param path - the file
 * @param line - which of the batch's line formats holds this file's records (a `jsonl` one)
 * @param options - mode and overwrite
 * @throws BandwrightError from {@link openResultsWriter}
 */
export function jsonLinesFileSink(path: string, line: number, options: FileSinkOptions): EntrySink & { writer: ResultsWriter } {
  const writer = openResultsWriter(path, { mode: options.mode, overwrite: options.overwrite === true, createFolder: true });
  return {
    writer,
    add: (item) => writer.write(item.lines[line] as string),
    finish: () => writer.commit(),
    abort: () => writer.abort(),
    doneMessage: `results written to ${path}`,
  };
}

/** Scans per page of the terminal table: a batch up to this size prints one table, as before. */
export const TABLE_PAGE_SCANS = 500;

/**
 * The terminal table, printed a page at a time (needs the batch to keep entries); a batch of at most `pageScans` scans prints exactly
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
    add(item) {
      page.push(entryOf(item));
      if (page.length >= pageScans) print();
    },
    finish: print,
    abort: () => {
      page = [];
    },
  };
}

/**
 * The `quantify --json` document streamed entry by entry (needs the batch to keep entries); the text is byte for byte what
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
    add(item) {
      const text = JSON.stringify(entryOf(item), null, 2).replace(/\n/g, '\n    ');
      out.write(`${count === 0 ? `${head}\n` : ',\n'}    ${text}`);
      count++;
    },
    finish,
    // Standard output cannot be taken back; close the document so it stays valid JSON.
    abort: finish,
  };
}
