/**
 * Tables with a header line (manifests, response tables, limits, results), read with papaparse
 * and validated cell by cell with line numbers.
 */
import Papa from 'papaparse';
import { BandwrightError } from '../errors.js';
import { resourceLimits } from '../resource-limits.js';
import { BYTE } from './bytes.js';

const { CR, LF, QUOTE } = BYTE;

/** One data row: cells by lower-cased, trimmed header name, and its 1-based line in the file. */
export interface TableRow {
  /** Line number of the row's start in the file (header is line 1 when it is the first line). */
  line: number;
  /** Cell text by column name (lower-cased, trimmed), trimmed. */
  cells: Map<string, string>;
}

/** A parsed table. */
export interface Table {
  /** Column names as written (trimmed), in order. */
  columns: string[];
  /** Data rows, blank lines skipped. */
  rows: TableRow[];
  /** The delimiter found. */
  delimiter: string;
  /** Whether decimal commas are in use (semicolon or tab delimiter with `1,5`-style numbers). */
  decimalComma: boolean;
}

/**
 * Parses CSV text with a header line. Comment lines starting with `#` before the header are skipped.
 *
 * @param input - the file's text (BOM already removed); LF, CRLF, CR or a mix of them end lines
 * @param source - file name for messages
 * @param options - `maxRows` (default 1,000,000, or BANDWRIGHT_MAX_TABLE_ROWS)
 * @returns the table
 * @throws BandwrightError `PARSE` for an empty table, duplicate or empty column names, unbalanced
 *   quotes or a wrong number of cells; `LIMIT` beyond `maxRows`
 */
export function parseTable(input: string, source: string, options: { maxRows?: number } = {}): Table {
  const maxRows = options.maxRows ?? resourceLimits().maxTableRows;
  const text = unifyLineEnds(input);
  const lineStarts = lineStartOffsets(text);
  const lineAt = (offset: number): number => {
    let lo = 0;
    let hi = lineStarts.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >>> 1;
      if ((lineStarts[mid] as number) <= offset) lo = mid;
      else hi = mid - 1;
    }
    return lo + 1;
  };

  const parsed = Papa.parse<string[]>(text, {
    header: false,
    skipEmptyLines: false,
    comments: false,
    delimiter: headerDelimiter(text),
    newline: '\n',
  });
  const quoteError = parsed.errors.find((e) => e.type === 'Quotes');
  if (quoteError !== undefined) {
    throw new BandwrightError('PARSE', `${source} line ${(quoteError.row ?? 0) + 1}: ${quoteError.message}`, {
      file: source,
    });
  }
  const delimiter = parsed.meta.delimiter;
  // papaparse does not report row offsets without a step callback; walk the rows and find each
  // row's start by searching for its first cell from the previous position.
  const records = parsed.data;
  let headerIndex = -1;
  let cursor = 0;
  const starts: number[] = [];
  for (let i = 0; i < records.length; i++) {
    starts.push(cursor);
    const next = text.indexOf('\n', cursor);
    // A quoted cell may hold a newline; advance past as many newlines as the row spans.
    const record = records[i] as string[];
    const spans = record.reduce((count, cell) => count + (cell.match(/\n/g)?.length ?? 0), 0);
    let end = next;
    for (let k = 0; k < spans && end !== -1; k++) end = text.indexOf('\n', end + 1);
    cursor = end === -1 ? text.length : end + 1;
  }
  for (let i = 0; i < records.length; i++) {
    const record = records[i] as string[];
    const first = (record[0] ?? '').trim();
    if (record.every((cell) => cell.trim() === '')) continue;
    if (first.startsWith('#')) continue;
    headerIndex = i;
    break;
  }
  if (headerIndex < 0)
    throw new BandwrightError(
      'PARSE',
      `${source}: the table is empty, expected a header line and data rows`,
      { file: source },
    );
  const columns = (records[headerIndex] as string[]).map((cell) => cell.trim());
  const keys = columns.map((name) => name.toLowerCase());
  const headerLine = lineAt(starts[headerIndex] as number);
  keys.forEach((key, i) => {
    if (key === '')
      throw new BandwrightError('PARSE', `${source} line ${headerLine}: column ${i + 1} has no name`, {
        file: source,
        line: headerLine,
      });
    const earlier = keys.indexOf(key);
    if (earlier !== i)
      throw new BandwrightError(
        'PARSE',
        `${source} line ${headerLine}: column ${JSON.stringify(columns[i])} appears twice (columns ` +
          `${earlier + 1} and ${i + 1})`,
        { file: source, line: headerLine },
      );
  });

  const rows: TableRow[] = [];
  let sawDecimalComma = false;
  for (let i = headerIndex + 1; i < records.length; i++) {
    const record = records[i] as string[];
    if (record.every((cell) => cell.trim() === '')) continue;
    const line = lineAt(starts[i] as number);
    if (record.length !== columns.length) {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${line}: ${record.length} cells, the header has ${columns.length} (${columns.join(delimiter)})`,
        { file: source, line },
      );
    }
    if (rows.length >= maxRows)
      throw new BandwrightError(
        'LIMIT',
        `${source}: more than ${maxRows} data rows, the limit (BANDWRIGHT_MAX_TABLE_ROWS raises it)`,
        { file: source },
      );
    const cells = new Map<string, string>();
    record.forEach((cell, k) => {
      const value = cell.trim();
      if (delimiter !== ',' && /^[+-]?\d+,\d+$/.test(value)) sawDecimalComma = true;
      cells.set(keys[k] as string, value);
    });
    rows.push({ line, cells });
  }
  return { columns, rows, delimiter, decimalComma: sawDecimalComma };
}

/**
 * Line ends outside quoted cells made LF: files edited on several systems mix CRLF and LF, and
 * old exports end lines with CR alone; papaparse splits on one kind only, which turned a mixed
 * file's rows into wrong cell counts and a CR-only file into "line 1" everywhere. Line breaks
 * inside quoted cells are cell content and stay as written.
 */
function unifyLineEnds(text: string): string {
  if (!text.includes('\r')) return text;
  let out = '';
  let quoted = false;
  let from = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === QUOTE) quoted = !quoted;
    else if (c === CR && !quoted) {
      out += `${text.slice(from, i)}\n`;
      if (text.charCodeAt(i + 1) === LF) i++;
      from = i + 1;
    }
  }
  return out + text.slice(from);
}

/**
 * The delimiter, judged from the header line alone: header names hold no decimal commas, so a tab
 * or semicolon there decides, and data rows such as `a.csv;10,5` cannot mislead the guess.
 */
function headerDelimiter(text: string): string {
  const header =
    text.split('\n').find((line) => line.trim() !== '' && !line.trimStart().startsWith('#')) ?? '';
  if (header.includes('\t')) return '\t';
  if (header.includes(';')) return ';';
  return ',';
}

function lineStartOffsets(text: string): number[] {
  const starts = [0];
  for (let i = text.indexOf('\n'); i !== -1; i = text.indexOf('\n', i + 1)) starts.push(i + 1);
  return starts;
}

const NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/**
 * Parses a numeric cell strictly: plain decimal or exponent notation, optional decimal comma
 * when the table uses one; `NaN`, `Infinity`, thousands separators and overflow are refused.
 *
 * @param text - the cell
 * @param where - `file line N: column` for the message
 * @param options - `decimalComma` to accept `1,5`
 * @returns the number
 * @throws BandwrightError `INVALID_VALUE` naming the cell, the value and the rule
 */
export function parseNumberCell(
  text: string,
  where: { file: string; line: number; column: string },
  options: { decimalComma?: boolean } = {},
): number {
  const normalised = options.decimalComma ? text.replace(',', '.') : text;
  const value = NUMBER.test(normalised) ? Number(normalised) : Number.NaN;
  if (!Number.isFinite(value)) {
    const rule = NUMBER.test(normalised) ? 'is too large for a double-precision number' : 'must be a number';
    throw new BandwrightError(
      'INVALID_VALUE',
      `${where.file} line ${where.line}: ${where.column} = ${JSON.stringify(text)}, ${rule}`,
      {
        file: where.file,
        line: where.line,
        parameter: where.column,
      },
    );
  }
  return value;
}

/**
 * Formats rows as CSV (RFC 4180 quoting) with formula-injection guarding: a text cell that starts
 * with `=`, `+`, `-`, `@`, tab or carriage return and is not a number gets a leading apostrophe, so
 * spreadsheets show it as text instead of evaluating it (OWASP CSV-injection guidance; common practice).
 *
 * @param columns - header names
 * @param rows - cell values (numbers are written with full precision as given)
 * @returns CSV text with a trailing newline
 */
export function formatCsv(
  columns: readonly string[],
  rows: readonly (readonly (string | number | undefined)[])[],
): string {
  const lines = [columns.map(guardCell).map(quoteCell).join(',')];
  for (const row of rows)
    lines.push(
      row
        .map((cell) => (typeof cell === 'number' ? String(cell) : quoteCell(guardCell(cell ?? ''))))
        .join(','),
    );
  return `${lines.join('\n')}\n`;
}

/**
 * Guards one text cell against spreadsheet formula injection (see {@link formatCsv}).
 *
 * @param cell - the text
 * @returns the text, prefixed with `'` when it would be read as a formula
 */
export function guardCell(cell: string): string {
  if (cell === '' || !/^[=+\-@\t\r]/.test(cell)) return cell;
  if (NUMBER.test(cell)) return cell;
  return `'${cell}`;
}

function quoteCell(cell: string): string {
  return /[",\n\r]/.test(cell) ? `"${cell.replace(/"/g, '""')}"` : cell;
}
