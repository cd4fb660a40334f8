/**
 * The data rows of a spectrum table: one pass per line straight from bytes into the columns,
 * with no string made per value (see `number-parse.ts`), checking monotonic x as it goes so that
 * every message names its line; and, only when a row is refused, the diagnosis that words why.
 * Data lines are contiguous; blank lines may follow the data, nothing else.
 */
import { BandwrightError } from '../../errors.js';
import { BYTE, shortText } from '../bytes.js';
import { scanNumber, type NumberSyntax, type ScanCursor } from '../number-parse.js';

const { COMMA, CR, HASH, LF, QUOTE, SEMICOLON, SPACE, TAB } = BYTE;

/**
 * Column buffers kept from one table to the next by the reader that owns them (a batch reads
 * thousands): rows are read into them and, unless the output may be views on them, the result
 * gets exact-size copies, so a table costs one allocation per column instead of a guess, its
 * growth and a trim. Buffers above {@link KEPT_COLUMN_LIMIT} values are not kept.
 */
export interface TableColumns {
  xs: Float64Array<ArrayBuffer>;
  ys: Float64Array<ArrayBuffer>;
  backgrounds: Float64Array<ArrayBuffer>;
}

/** The longest column buffer kept for the next table, in values. */
const KEPT_COLUMN_LIMIT = 1 << 18;

function delimiterName(byte: number): string {
  return byte === TAB ? 'tab' : `'${String.fromCharCode(byte)}'`;
}

/** What the row loop needs; passed explicitly so the hot loop keeps its values in registers. */
export interface RowContext {
  bytes: Uint8Array;
  length: number;
  source: string;
  delimiter: number;
  decimal: number;
  decimalDetected: boolean;
  skipTabs: boolean;
  quotesRequired: boolean;
  columnCount: number;
  names: string[];
  /** Initial length of the output arrays (they double when full, up to maxPoints). */
  capacity: number;
  maxPoints: number;
  syntax: NumberSyntax;
  /** Per column: 0 x, 1 y (or sample), 2 background. */
  roles: number[];
}

function rowFail(
  context: RowContext,
  code: 'PARSE' | 'INVALID_VALUE' | 'NOT_MONOTONIC' | 'LIMIT',
  line: number,
  message: string,
  parameter?: string,
): never {
  const source = context.source;
  throw new BandwrightError(
    code,
    `${source} line ${line}: ${message}`,
    parameter === undefined ? { file: source, line } : { file: source, line, parameter },
  );
}

function fieldEnd(context: RowContext, start: number, end: number): number {
  const { bytes, delimiter } = context;
  let quoted = false;
  for (let i = start; i < end; i++) {
    const c = bytes[i];
    if (c === QUOTE) quoted = !quoted;
    else if (!quoted && c === delimiter) return i;
  }
  return end;
}

function lineEndAt(context: RowContext, from: number): number {
  const { bytes, length } = context;
  let end = bytes.indexOf(LF, from);
  if (end < 0) end = length;
  if (end > from && bytes[end - 1] === CR) end--;
  return end;
}

/** Diagnoses a field that is not a number and throws the most specific message. */
function badField(context: RowContext, line: number, column: number, start: number, lineEnd: number): never {
  const { delimiter, decimal } = context;
  const name = context.names[column] ?? `column ${column + 1}`;
  const stop = fieldEnd(context, start, lineEnd);
  let text = shortText(context.bytes, start, stop).trim();
  if (text.length >= 2 && text.startsWith('"') && text.endsWith('"')) text = text.slice(1, -1);
  if (text === '')
    return rowFail(context, 'PARSE', line, `column ${column + 1} (${name}) is empty, must be a number`, name);
  if (/^[+-]?(nan|inf|infinity)$/i.test(text)) {
    return rowFail(
      context,
      'INVALID_VALUE',
      line,
      `column ${column + 1} (${name}) = ${JSON.stringify(text)}, must be a finite number`,
      name,
    );
  }
  for (const other of [TAB, SEMICOLON, COMMA]) {
    // A stray comma in a tab/semicolon table is a decimal-separator problem, reported below.
    if (other === COMMA && delimiter !== COMMA) continue;
    if (other !== delimiter && other !== decimal && text.includes(String.fromCharCode(other))) {
      return rowFail(
        context,
        'PARSE',
        line,
        `${delimiterName(other)} found in ${JSON.stringify(text)} but the delimiter is ` +
          `${delimiterName(delimiter)}; mixed delimiters`,
        name,
      );
    }
  }
  const commaDelimiterNote =
    delimiter === COMMA
      ? ', or quote every field, since a decimal comma with a comma delimiter is ambiguous'
      : '';
  const detectedNote = context.decimalDetected ? ', detected from commas in the data' : '';
  const hint =
    decimal !== COMMA && text.includes(',')
      ? ` (the decimal separator is '.'; for a decimal comma use ';' or tab as the delimiter${commaDelimiterNote})`
      : decimal === COMMA && text.includes('.')
        ? ` (the decimal separator is ','${detectedNote}; a '.' is not accepted with it, nor is digit grouping)`
        : '';
  return rowFail(
    context,
    'PARSE',
    line,
    `column ${column + 1} (${name}) = ${JSON.stringify(text)}, not a number; must be a decimal such ` +
      `as 2143.5 or 1.2e-3${hint}`,
    name,
  );
}

function grown(array: Float64Array<ArrayBuffer>, capacity: number): Float64Array<ArrayBuffer> {
  if (array.length >= capacity) return array;
  const bigger = new Float64Array(capacity);
  bigger.set(array);
  return bigger;
}

function keep(
  array: Float64Array<ArrayBuffer>,
  previous: Float64Array<ArrayBuffer>,
): Float64Array<ArrayBuffer> {
  return array.length <= KEPT_COLUMN_LIMIT && array.length > previous.length ? array : previous;
}

/**
 * The data rows: one pass per line, numbers scanned up to the buffer's end (a line break is not a
 * digit, so no number runs past its line); the line end is looked for only to explain an error.
 * Checks monotonic x as it goes, so the message names the line.
 *
 * @param context - the table's layout and limits
 * @param start - byte offset of the first data line
 * @param firstLine - its 1-based line number
 * @param columns - buffers to read into; left holding the grown buffers for the next table
 * @returns the point count, the x direction (1 ascending, -1 descending, 0 for one point) and the
 *   columns (views valid until `columns` is used again)
 * @throws BandwrightError `PARSE` (fields, column counts, comments or gaps in the data),
 *   `INVALID_VALUE` (overflow, NaN, infinities), `NOT_MONOTONIC`, `LIMIT`
 */
export function readRows(
  context: RowContext,
  start: number,
  firstLine: number,
  columns: TableColumns,
): { n: number; direction: number; xs: Float64Array; ys: Float64Array; backgrounds: Float64Array } {
  const { bytes, length, delimiter, skipTabs, quotesRequired, columnCount, syntax, roles, maxPoints } =
    context;
  // Capacity is what the rows may fill before growing (never above maxPoints); the reused buffers may be longer.
  let capacity = Math.min(maxPoints, Math.max(context.capacity, columns.xs.length));
  let xs = grown(columns.xs, capacity);
  let ys = grown(columns.ys, capacity);
  let backgrounds = columnCount === 3 ? grown(columns.backgrounds, capacity) : columns.backgrounds;
  const cursor: ScanCursor = { end: 0 };
  const lastColumn = columnCount - 1;
  let n = 0;
  let direction = 0;
  let blankLine = 0;
  let pos = start;
  let lineNumber = firstLine - 1;
  while (pos < length) {
    lineNumber++;
    let p = pos;
    let c = bytes[p] as number;
    while (c === SPACE || (skipTabs && c === TAB)) c = bytes[++p] as number;
    if (p >= length || c === LF || c === CR) {
      const end = lineEndAt(context, pos);
      if (end > p)
        rowFail(context, 'PARSE', lineNumber, 'a carriage return inside the line; lines end with LF or CRLF');
      pos = end < length && bytes[end] === CR ? end + 2 : end + 1;
      if (blankLine === 0) blankLine = lineNumber;
      continue;
    }
    if (blankLine !== 0)
      rowFail(
        context,
        'PARSE',
        lineNumber,
        `data after the blank line ${blankLine}; the data lines of a table must be contiguous`,
      );
    if (c === HASH)
      rowFail(
        context,
        'PARSE',
        lineNumber,
        'comment line inside the data; # comments are allowed only before the data',
      );
    if (n === capacity) {
      if (capacity >= maxPoints)
        rowFail(
          context,
          'LIMIT',
          lineNumber,
          `more than ${maxPoints} data points, the limit (maxPoints; BANDWRIGHT_MAX_POINTS raises it)`,
        );
      capacity = Math.min(maxPoints, capacity * 2);
      xs = grown(xs, capacity);
      ys = grown(ys, capacity);
      if (columnCount === 3) backgrounds = grown(backgrounds, capacity);
    }
    for (let column = 0; column < columnCount; column++) {
      c = bytes[p] as number;
      while (c === SPACE || (skipTabs && c === TAB)) c = bytes[++p] as number;
      const fieldStart = p;
      const quoted = c === QUOTE;
      if (quoted) p++;
      else if (quotesRequired) {
        rowFail(
          context,
          'PARSE',
          lineNumber,
          `column ${column + 1} is not quoted; with a decimal comma and a comma delimiter every ` +
            `field must be quoted ("1234,5","0,25"), otherwise the comma is ambiguous`,
        );
      }
      const value = scanNumber(bytes, p, length, syntax, cursor);
      if (cursor.end === p) badField(context, lineNumber, column, fieldStart, lineEndAt(context, fieldStart));
      p = cursor.end;
      if (quoted) {
        if (bytes[p] !== QUOTE)
          badField(context, lineNumber, column, fieldStart, lineEndAt(context, fieldStart));
        p++;
      }
      c = bytes[p] as number;
      while (c === SPACE || (skipTabs && c === TAB)) c = bytes[++p] as number;
      if (column < lastColumn) {
        if (c !== delimiter) {
          const end = lineEndAt(context, fieldStart);
          if (p >= end)
            rowFail(
              context,
              'PARSE',
              lineNumber,
              `${column + 1} field(s), expected ${columnCount} (${context.names.join(', ')})`,
            );
          badField(context, lineNumber, column, fieldStart, end);
        }
        p++;
      } else {
        if (c === CR && (p + 1 >= length || bytes[p + 1] === LF)) p++;
        if (p < length && bytes[p] !== LF) {
          const end = lineEndAt(context, fieldStart);
          if (p < end && bytes[p] === delimiter) {
            let fields = columnCount;
            for (let k = p; k < end; k = fieldEnd(context, k + 1, end)) fields++;
            const hint =
              context.decimal !== COMMA && delimiter === COMMA
                ? '; if the numbers use a decimal comma, a comma delimiter is ambiguous: ' +
                  'use ; or tab, or quote every field'
                : '';
            rowFail(
              context,
              'PARSE',
              lineNumber,
              `${fields} fields, expected ${columnCount} (${context.names.join(', ')})${hint}`,
            );
          }
          if (p >= end)
            rowFail(
              context,
              'PARSE',
              lineNumber,
              'a carriage return inside the line; lines end with LF or CRLF',
            );
          badField(context, lineNumber, column, fieldStart, end);
        }
      }
      if (value - value !== 0) {
        const name = context.names[column] ?? `column ${column + 1}`;
        rowFail(
          context,
          'INVALID_VALUE',
          lineNumber,
          `column ${column + 1} (${name}) = ` +
            `${JSON.stringify(shortText(bytes, fieldStart, cursor.end).trim())} overflows a ` +
            `double, must be a finite number`,
          name,
        );
      }
      const role = roles[column];
      if (role === 0) xs[n] = value;
      else if (role === 1) ys[n] = value;
      else backgrounds[n] = value;
    }
    pos = p + 1;
    if (n > 0) {
      const step = (xs[n] as number) - (xs[n - 1] as number);
      if (step === 0)
        rowFail(
          context,
          'NOT_MONOTONIC',
          lineNumber,
          `x = ${xs[n]} repeats the previous line's x; duplicate x value`,
          context.names[0],
        );
      const sign = step > 0 ? 1 : -1;
      if (direction === 0) direction = sign;
      else if (sign !== direction) {
        rowFail(
          context,
          'NOT_MONOTONIC',
          lineNumber,
          `x = ${xs[n]} after ${xs[n - 1]} reverses the ` +
            `${direction > 0 ? 'ascending' : 'descending'} order; x values must be strictly ` +
            `increasing or strictly decreasing`,
          context.names[0],
        );
      }
    }
    n++;
  }
  columns.xs = keep(xs, columns.xs);
  columns.ys = keep(ys, columns.ys);
  columns.backgrounds = keep(backgrounds, columns.backgrounds);
  return { n, direction, xs, ys, backgrounds };
}
