/**
 * `##XYPOINTS=(XY..XY)`: AFFN x, y pairs separated by `;`, `,`, spaces or line breaks, for
 * unevenly spaced abscissae. Checked: the count against `##NPOINTS`, x strictly monotonic, and
 * the first and last x against `##FIRSTX` and `##LASTX` (within half a unit of their last printed
 * digit).
 */
import { BandwrightError } from '../../errors.js';
import { BYTE, decodeText } from '../bytes.js';
import { DECIMAL_POINT, scanNumber, type ScanCursor } from '../number-parse.js';
import type { JcampHeader, PrintedNumber } from './header.js';
import { Ordinates } from './ordinate-stream.js';
import { scaleOrdinates } from './ordinates.js';
import { commentStart, type JcampRecord } from './records.js';

const { COMMA, CR, LF, QUESTION_MARK, SEMICOLON, SPACE, TAB } = BYTE;

function isPairSeparator(c: number): boolean {
  return c === SPACE || c === TAB || c === COMMA || c === SEMICOLON;
}

function decodeXyPoints(
  bytes: Uint8Array,
  record: JcampRecord,
  source: string,
  maxPoints: number,
): { x: Float64Array; y: Float64Array; lines: Int32Array } {
  const format = record.value.toUpperCase().replace(/\s+/g, '');
  if (format !== '(XY..XY)') {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${record.line}: ##XYPOINTS=${record.value} not supported; only (XY..XY)`,
      { file: source, line: record.line },
    );
  }
  const xs = new Ordinates(1024);
  const ys = new Ordinates(1024);
  const lines: number[] = [];
  const cursor: ScanCursor = { end: 0 };
  let lineNumber = record.line;
  let pos = record.dataStart;
  const stop = record.dataEnd;
  let count = 0;
  while (pos < stop) {
    lineNumber++;
    let lineEnd = bytes.indexOf(LF, pos);
    if (lineEnd < 0 || lineEnd > stop) lineEnd = stop;
    let end = lineEnd;
    if (end > pos && bytes[end - 1] === CR) end--;
    let p = pos;
    pos = lineEnd + 1;
    const hash = commentStart(bytes, p, end);
    if (hash >= 0) end = hash;
    while (p < end) {
      const c = bytes[p] as number;
      if (isPairSeparator(c)) {
        p++;
        continue;
      }
      if (c === QUESTION_MARK) {
        throw new BandwrightError(
          'PARSE',
          `${source} line ${lineNumber}: '?' (a missing value); a spectrum needs every point`,
          { file: source, line: lineNumber },
        );
      }
      const value = scanNumber(bytes, p, end, DECIMAL_POINT, cursor);
      const next = cursor.end < end ? (bytes[cursor.end] as number) : SPACE;
      if (cursor.end === p || !isPairSeparator(next)) {
        let stopAt = p;
        while (
          stopAt < end &&
          bytes[stopAt] !== SPACE &&
          bytes[stopAt] !== COMMA &&
          bytes[stopAt] !== SEMICOLON
        )
          stopAt++;
        throw new BandwrightError(
          'PARSE',
          `${source} line ${lineNumber}: ${JSON.stringify(decodeText(bytes, p, stopAt))} is not a ` +
            `number (XYPOINTS holds AFFN x, y pairs)`,
          {
            file: source,
            line: lineNumber,
          },
        );
      }
      if (!Number.isFinite(value)) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `${source} line ${lineNumber}: ${JSON.stringify(decodeText(bytes, p, cursor.end))} ` +
            `overflows a double, must be finite`,
          {
            file: source,
            line: lineNumber,
          },
        );
      }
      p = cursor.end;
      if (count % 2 === 0) {
        if (xs.length >= maxPoints) {
          throw new BandwrightError(
            'LIMIT',
            `${source} line ${lineNumber}: more than ${maxPoints} data points, the limit (maxPoints; ` +
              `BANDWRIGHT_MAX_POINTS raises it)`,
            { file: source, line: lineNumber },
          );
        }
        xs.push(value);
        lines.push(lineNumber);
      } else ys.push(value);
      count++;
    }
  }
  if (count % 2 !== 0) {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${lineNumber}: ##XYPOINTS ends with an x value without its y (${count} numbers, must be pairs)`,
      { file: source, line: lineNumber },
    );
  }
  return {
    x: xs.values.slice(0, xs.length),
    y: ys.values.slice(0, ys.length),
    lines: Int32Array.from(lines),
  };
}

/**
 * Reads an `##XYPOINTS=(XY..XY)` table.
 *
 * @param bytes - file content
 * @param record - the XYPOINTS record
 * @param header - the file's header
 * @param source - label for messages
 * @param maxPoints - most points accepted
 * @returns x in the header's unit (times XFACTOR) and y (times YFACTOR), in file order
 * @throws BandwrightError `PARSE` (format, syntax, odd count, NPOINTS, FIRSTX/LASTX),
 *   `INVALID_VALUE` (overflow), `NOT_MONOTONIC`, `LIMIT`
 */
export function readXyPoints(
  bytes: Uint8Array,
  record: JcampRecord,
  header: JcampHeader,
  source: string,
  maxPoints: number,
): { x: Float64Array; y: Float64Array } {
  const { x, y, lines } = decodeXyPoints(bytes, record, source, maxPoints);
  const n = x.length;
  if (header.nPoints !== undefined && header.nPoints !== n) {
    throw new BandwrightError(
      'PARSE',
      `${source}: ##NPOINTS=${header.nPoints} but ##XYPOINTS (line ${record.line}) holds ${n} ` +
        `points; the data or the count is wrong`,
      {
        file: source,
        line: record.line,
        parameter: 'NPOINTS',
      },
    );
  }
  for (let i = 0; i < n; i++) x[i] = (x[i] as number) * header.xFactor;
  scaleOrdinates(y, n, header.yFactor, y);
  let direction = 0;
  for (let i = 1; i < n; i++) {
    const stepSign = Math.sign((x[i] as number) - (x[i - 1] as number));
    const line = lines[i] as number;
    if (stepSign === 0 || (direction !== 0 && stepSign !== direction)) {
      throw new BandwrightError(
        'NOT_MONOTONIC',
        `${source} line ${line}: x = ${x[i]} after ${x[i - 1]}, ` +
          `${stepSign === 0 ? 'duplicate x value' : 'x values must be strictly increasing or strictly decreasing'}`,
        { file: source, line },
      );
    }
    direction = stepSign;
  }
  const check = (
    label: 'FIRSTX' | 'LASTX',
    given: PrintedNumber | undefined,
    actual: number | undefined,
  ): void => {
    if (given === undefined || actual === undefined) return;
    const tolerance = 0.5 * given.unit + 1e-9 * Math.abs(given.value);
    if (!(Math.abs(actual - given.value) <= tolerance)) {
      throw new BandwrightError(
        'PARSE',
        `${source}: ##${label}=${given.value} but ##XYPOINTS ` +
          `${label === 'FIRSTX' ? 'starts' : 'ends'} at x = ${actual}`,
        { file: source, parameter: label },
      );
    }
  };
  check('FIRSTX', header.firstX, x[0]);
  check('LASTX', header.lastX, x[n - 1]);
  return { x, y };
}
