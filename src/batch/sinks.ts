/**
 * Where the entries of a batch go, one at a time as they come: a results CSV or JSON-lines file
 * (rows made by `scan-quantifier.ts` where the scan was quantified, written through the streaming
 * results writer), the terminal table, or the `--json` document on stdout.
 * Each output holds at most one page of entries, so memory stays flat in the number of scans,
 * and each gives the same text as the whole-batch formatters of `report/results.ts`.
 */
import { isBandwrightError } from '../errors.js';
import { formatCsv } from '../formats/csv-table.js';
import { formatResultsText, resultColumns, resultsDocument, type BatchEntry } from '../report/results.js';
import { openResultsWriter } from './results-writer.js';
import type { BatchItem, LineFormat, ResultGases } from './scan-quantifier.js';

/** A place to write text (a stream, or a buffer in tests). */
export interface TextSink {
  write(text: string): unknown;
}

/** One output of a batch. */
export interface EntrySink {
  /** Takes the next scan's item (input order). */
  add(item: BatchItem): void;
  /** Completes the output (closing text, rename into place). */
  finish(): void;
  /** Gives up (removes a temporary file); safe to call after a failed finish. */
  abort(): void;
  /** The file this output writes, for a result file. */
  readonly file?: string;
}

/** The header line of a results CSV for these gases. */
function resultsCsvHeader(format: Extract<LineFormat, { kind: 'csv' }>): string {
  return formatCsv(resultColumns(format.gases, { warningsColumn: format.warningsColumn !== false }), []);
}

/** The entry of an item, for the outputs that need it (the batch keeps entries for them). */
function entryOf(item: BatchItem): BatchEntry {
  if (item.entry === undefined)
    throw new Error('batch output needs entries but the batch was set up without keepEntries');
  return item.entry;
}

/** Options shared by the file outputs. */
export interface FileSinkOptions {
  /** `replace` (batch: temporary file renamed at the end) or `append` (watch). */
  mode: 'replace' | 'append';
  /** Replace an existing file (replace mode). */
  overwrite?: boolean;
}

/** A result file of a batch: where it goes and what each scan's line in it is. */
export interface ResultFile {
  path: string;
  format: LineFormat;
}

/**
 * The result files asked for by `--csv` and `--jsonl`, in that order.
 *
 * @param paths - the options' values
 * @param gases - result columns of the CSV
 * @param sha256 - the calibration's hash, written in every line
 */
export function resultFiles(
  paths: { csv?: string | undefined; jsonl?: string | undefined },
  gases: ResultGases,
  sha256: string,
): ResultFile[] {
  const files: ResultFile[] = [];
  if (paths.csv !== undefined) files.push({ path: paths.csv, format: { kind: 'csv', gases, sha256 } });
  if (paths.jsonl !== undefined) files.push({ path: paths.jsonl, format: { kind: 'jsonl', sha256 } });
  return files;
}

/**
 * Opens the result files of a batch (CSV with its header, JSON lines), each written as its lines
 * come. The returned `lineFormats` go into the batch setup: file k writes `item.lines[k]`.
 *
 * @param files - the files and their formats
 * @param options - mode and overwrite
 * @returns one sink per file, and the line formats in the same order
 * @throws BandwrightError from {@link openResultsWriter} (the files opened before are abandoned)
 */
export function openResultFiles(
  files: readonly ResultFile[],
  options: FileSinkOptions,
): { sinks: EntrySink[]; lineFormats: LineFormat[] } {
  const sinks: EntrySink[] = [];
  const lineFormats = files.map((file) => file.format);
  try {
    files.forEach(({ path, format }, line) => {
      const open = (as: LineFormat): ReturnType<typeof openResultsWriter> =>
        openResultsWriter(path, {
          mode: options.mode,
          ...(as.kind === 'csv' ? { header: resultsCsvHeader(as) } : {}),
          overwrite: options.overwrite === true,
          createFolder: true,
        });
      let writer: ReturnType<typeof openResultsWriter>;
      try {
        writer = open(format);
      } catch (error) {
        // A results CSV made before the `warnings` column existed keeps growing in its own layout.
        if (!(options.mode === 'append' && format.kind === 'csv' && isBandwrightError(error, 'PARSE')))
          throw error;
        const earlier: LineFormat = { ...format, warningsColumn: false };
        try {
          writer = open(earlier);
        } catch {
          throw error;
        }
        lineFormats[line] = earlier;
      }
      sinks.push({
        add: (item) => writer.write(item.lines[line] as string),
        finish: () => writer.commit(),
        abort: () => writer.abort(),
        file: path,
      });
    });
  } catch (error) {
    for (const sink of sinks) sink.abort();
    throw error;
  }
  return { sinks, lineFormats };
}

/** Scans per page of the terminal table: a batch up to this size prints one table, as before. */
export const TABLE_PAGE_SCANS = 500;

/**
 * The terminal table, printed a page at a time (needs the batch to keep entries); a batch of at
 * most `pageScans` scans prints exactly the one table `formatResultsText` gives for all of it,
 * longer batches one such table per page, separated by a blank line.
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
 * The `quantify --json` document streamed entry by entry (needs the batch to keep entries); the
 * text is byte for byte what `JSON.stringify(resultsDocument(entries, calibration, level), null, 2)`
 * gives, plus a line break.
 *
 * @param out - standard output
 * @param calibration - the calibration's file and hash
 * @param level - interval level
 */
export function jsonDocumentSink(
  out: TextSink,
  calibration: { file: string; sha256: string },
  level: number,
): EntrySink {
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
