/**
 * ASDF, the character forms of JCAMP-DX ordinates (JCAMP-DX 5.01; McDonald & Wilks, Applied
 * Spectroscopy 42 (1988) 151): the alphabet, and the general decoder of one `##XYDATA` line that
 * reads every form — AFFN and PAC numbers separated by `+`, `-`, space, tab or `,`, SQZ, DIF, DUP,
 * mixed on a line — and words every error. In DIF form the last ordinate of a line is repeated as
 * the first of the next (the Y check); a mismatch is a `YCHECK` error, never silently decoded.
 *
 * A line that reads entirely as AFFN numbers with exponents (`4000 1.5E-03 1.6E-03`) is AFFN;
 * otherwise `E`/`e` are the SQZ characters +5/−5, as ASDF defines them.
 */
import { BYTE, decodeText } from '../bytes.js';
import { DECIMAL_POINT, DECIMAL_POINT_NO_EXPONENT, scanNumber, type ScanCursor } from '../number-parse.js';
import {
  ORDINATE_FORM,
  dataError,
  emitError,
  printedUnitOf,
  type LineX,
  type OrdinateStream,
} from './ordinate-stream.js';

const { ABSOLUTE, DIFFERENCE } = ORDINATE_FORM;
const { COMMA, MINUS, PERIOD, PLUS, QUESTION_MARK, SPACE, TAB } = BYTE;

/** Codes of the ASDF alphabet (see {@link ASDF}). */
const CODE = Object.freeze({
  SQZ: 0x00,
  DIF: 0x10,
  DUP: 0x20,
  SEPARATOR: 0x30,
  KIND: 0x30,
  NEGATIVE: 0x40,
  OTHER: 0x80,
});

/**
 * The ASDF alphabet: one code per byte, `codes[byte]`. Bits 0–3 hold the first digit a lead
 * character stands for, bits 4–5 its kind (SQZ, DIF, DUP, or SEPARATOR for space, tab and comma;
 * mask KIND), bit 6 (NEGATIVE) a negative sign; codes from OTHER up are no lead character and no
 * separator. The table is never written after it is made.
 */
export const ASDF = Object.freeze({ codes: new Uint8Array(256).fill(CODE.OTHER), ...CODE });
{
  const lead = (text: string, code: number, firstDigit: number): void => {
    for (let k = 0; k < text.length; k++) ASDF.codes[text.charCodeAt(k)] = code | (firstDigit + k);
  };
  // JCAMP-DX 5.01 ASDF tables: SQZ @A–I (0…9) a–i (−1…−9), DIF %J–R (0…9) j–r (−1…−9),
  // DUP S–Z s (1…9).
  lead('@ABCDEFGHI', CODE.SQZ, 0);
  lead('abcdefghi', CODE.SQZ | CODE.NEGATIVE, 1);
  lead('%JKLMNOPQR', CODE.DIF, 0);
  lead('jklmnopqr', CODE.DIF | CODE.NEGATIVE, 1);
  lead('STUVWXYZs', CODE.DUP, 1);
  for (const c of [SPACE, TAB, COMMA]) ASDF.codes[c] = CODE.SEPARATOR;
}
const {
  codes: ASDF_CODE,
  SQZ: CODE_SQZ,
  DIF: CODE_DIF,
  KIND: CODE_KIND,
  NEGATIVE: CODE_NEGATIVE,
  OTHER: CODE_OTHER,
} = ASDF;

const KIND_ABSOLUTE = 0;
const KIND_DIFFERENCE = 1;
const KIND_DUPLICATE = 2;

/** Where a data line is, for messages. */
export interface DataLine {
  source: string;
  /** 1-based line number. */
  number: number;
  /** Byte offset of the line's first byte (columns in messages count from it). */
  start: number;
}

/** True when the line [start, end) reads entirely as blank/comma separated AFFN numbers with at least one exponent. */
function isExponentAffnLine(bytes: Uint8Array, start: number, end: number, cursor: ScanCursor): boolean {
  let sawExponent = false;
  for (let i = start + 1; i < end && !sawExponent; i++) {
    const c = bytes[i];
    const before = bytes[i - 1] as number;
    sawExponent = (c === 0x45 || c === 0x65) && ((before >= 0x30 && before <= 0x39) || before === PERIOD);
  }
  if (!sawExponent) return false;
  let p = start;
  let tokens = 0;
  while (p < end) {
    const c = bytes[p];
    if (c === SPACE || c === TAB || c === COMMA) {
      p++;
      continue;
    }
    scanNumber(bytes, p, end, DECIMAL_POINT, cursor);
    if (cursor.end === p) return false;
    p = cursor.end;
    if (p < end && bytes[p] !== SPACE && bytes[p] !== TAB && bytes[p] !== COMMA) return false;
    tokens++;
  }
  return tokens >= 2;
}

/**
 * Decodes one `##XYDATA` data line of any form into the stream, or throws the error that stops it.
 *
 * @param bytes - file content
 * @param start - first non-blank byte of the line
 * @param end - one past its last byte, comments and trailing blanks removed
 * @param mayHaveExponent - whether an `e` or `E` occurs in the line (else it cannot be an AFFN
 *   line with exponents)
 * @param stream - the table's decoder state, advanced by the line's ordinates
 * @param cursor - scratch for the number scanner
 * @param line - source, line number and line start, for messages
 * @param lineX - receives the X that opens the line and its printed unit
 * @throws BandwrightError `PARSE` (syntax, a line without ordinates, misplaced DIF or DUP),
 *   `YCHECK`, `LIMIT`
 */
export function decodeDataLine(
  bytes: Uint8Array,
  start: number,
  end: number,
  mayHaveExponent: boolean,
  stream: OrdinateStream,
  cursor: ScanCursor,
  line: DataLine,
  lineX: LineX,
): void {
  if (mayHaveExponent && isExponentAffnLine(bytes, start, end, cursor)) {
    decodeExponentAffnLine(bytes, start, end, stream, cursor, line, lineX);
    stream.yCheckPending = false;
  } else {
    decodeTokenLine(bytes, start, end, stream, cursor, line, lineX);
    stream.yCheckPending = stream.lastKind === DIFFERENCE;
  }
}

function decodeExponentAffnLine(
  bytes: Uint8Array,
  start: number,
  end: number,
  stream: OrdinateStream,
  cursor: ScanCursor,
  line: DataLine,
  lineX: LineX,
): void {
  const { source, number: lineNumber } = line;
  let tokenCount = 0;
  let p = start;
  while (p < end) {
    const c = bytes[p];
    if (c === SPACE || c === TAB || c === COMMA) {
      p++;
      continue;
    }
    const tokenStart = p;
    const value = scanNumber(bytes, p, end, DECIMAL_POINT, cursor);
    p = cursor.end;
    if (!Number.isFinite(value))
      dataError(
        source,
        lineNumber,
        'PARSE',
        `${JSON.stringify(decodeText(bytes, tokenStart, p))} overflows a double`,
      );
    if (tokenCount === 0) {
      lineX.x = value;
      lineX.printedUnit = printedUnitOf(bytes, tokenStart, p);
    } else if (!stream.emit(value, ABSOLUTE)) emitError(stream, source, lineNumber);
    tokenCount++;
  }
  if (stream.ordinatesOnLine === 0)
    dataError(source, lineNumber, 'PARSE', 'a data line needs an X value and at least one ordinate');
}

function decodeTokenLine(
  bytes: Uint8Array,
  start: number,
  end: number,
  stream: OrdinateStream,
  cursor: ScanCursor,
  line: DataLine,
  lineX: LineX,
): void {
  const { source, number: lineNumber } = line;
  const maxPoints = stream.maxPoints;
  const quoted = (from: number, to: number): string => JSON.stringify(decodeText(bytes, from, to));
  let tokenCount = 0;
  let lastWasDup = false;
  let p = start;
  while (p < end) {
    const c = bytes[p] as number;
    if (c === SPACE || c === TAB || c === COMMA) {
      p++;
      continue;
    }
    const tokenStart = p;
    let value: number;
    let kind: number;
    if ((c >= 0x30 && c <= 0x39) || c === PERIOD || c === PLUS || c === MINUS) {
      value = scanNumber(bytes, p, end, DECIMAL_POINT_NO_EXPONENT, cursor);
      if (cursor.end === p)
        dataError(source, lineNumber, 'PARSE', `${quoted(p, Math.min(end, p + 12))} is not a number`);
      p = cursor.end;
      kind = KIND_ABSOLUTE;
    } else {
      const code = ASDF_CODE[c] as number;
      if (code >= CODE_OTHER) {
        return dataError(
          source,
          lineNumber,
          'PARSE',
          c === QUESTION_MARK
            ? `'?' (a missing value) at column ${p - line.start + 1}; a spectrum needs every ordinate`
            : `unexpected character ${JSON.stringify(String.fromCharCode(c))} at column ` +
                `${p - line.start + 1}; not AFFN, SQZ, DIF or DUP`,
        );
      }
      const codeKind = code & CODE_KIND;
      kind = codeKind === CODE_SQZ ? KIND_ABSOLUTE : codeKind === CODE_DIF ? KIND_DIFFERENCE : KIND_DUPLICATE;
      p++;
      let magnitude = code & 0x0f;
      while (p < end) {
        const digit = (bytes[p] as number) - 0x30;
        if (digit >>> 0 > 9) break;
        magnitude = magnitude * 10 + digit;
        p++;
      }
      if (p < end && bytes[p] === PERIOD) {
        dataError(
          source,
          lineNumber,
          'PARSE',
          `decimal point after the ASDF value ${quoted(tokenStart, p + 1)}; SQZ, DIF and DUP values are integers`,
        );
      }
      value = (code & CODE_NEGATIVE) === 0 ? magnitude : -magnitude;
    }
    if (!Number.isFinite(value))
      dataError(source, lineNumber, 'PARSE', `${quoted(tokenStart, p)} overflows a double`);
    if (tokenCount === 0) {
      if (kind !== KIND_ABSOLUTE)
        dataError(
          source,
          lineNumber,
          'PARSE',
          `the line starts with ${quoted(tokenStart, p)}, must start with the X value (AFFN or SQZ)`,
        );
      lineX.x = value;
      lineX.printedUnit = c >= 0x40 ? 1 : printedUnitOf(bytes, tokenStart, p);
      tokenCount++;
      continue;
    }
    tokenCount++;
    if (kind === KIND_ABSOLUTE) {
      if (!stream.emit(value, ABSOLUTE)) emitError(stream, source, lineNumber);
      lastWasDup = false;
    } else if (kind === KIND_DIFFERENCE) {
      if (stream.ordinatesOnLine === 0) {
        dataError(
          source,
          lineNumber,
          'PARSE',
          `DIF value ${quoted(tokenStart, p)} is the first ordinate of the line; the first ordinate ` +
            `must be absolute (SQZ or AFFN)`,
        );
      }
      stream.lastDifference = value;
      if (!stream.emit(stream.previous + value, DIFFERENCE)) emitError(stream, source, lineNumber);
      lastWasDup = false;
    } else {
      if (stream.ordinatesOnLine === 0 || lastWasDup) {
        dataError(
          source,
          lineNumber,
          'PARSE',
          `DUP count ${quoted(tokenStart, p)} ` +
            `${lastWasDup ? 'follows another DUP' : 'has no value before it to repeat'}`,
        );
      }
      if (value < 1) dataError(source, lineNumber, 'PARSE', `DUP count ${value}, must be >= 1`);
      if (stream.out.length + value - 1 > maxPoints)
        dataError(
          source,
          lineNumber,
          'LIMIT',
          `DUP count ${value} gives more than ${maxPoints} data points, the limit (maxPoints; ` +
            `BANDWRIGHT_MAX_POINTS raises it)`,
        );
      const repeated = stream.lastKind;
      for (let k = 1; k < value; k++) {
        const next = repeated === DIFFERENCE ? stream.previous + stream.lastDifference : stream.previous;
        if (!stream.emit(next, repeated)) emitError(stream, source, lineNumber);
      }
      lastWasDup = true;
    }
  }
  if (stream.ordinatesOnLine === 0)
    dataError(source, lineNumber, 'PARSE', 'a data line needs an X value and at least one ordinate');
}
