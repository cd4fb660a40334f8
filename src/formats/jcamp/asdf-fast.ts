/**
 * The single-pass decoder of ordinary ASDF data lines: an AFFN X followed only by SQZ, DIF and DUP
 * tokens (JCAMP-DX 5.01, McDonald & Wilks, Applied Spectroscopy 42 (1988) 151), which is what
 * instruments write. Any other line is left to the general token loop (`asdf.ts`), which also
 * words every error.
 */
import { BYTE } from '../bytes.js';
import { DECIMAL_POINT_NO_EXPONENT, scanNumber, type ScanCursor } from '../number-parse.js';
import { ASDF } from './asdf.js';
import { ORDINATE_FORM, printedUnitOf, type LineX, type OrdinateStream } from './ordinate-stream.js';

const { ABSOLUTE, DIFFERENCE } = ORDINATE_FORM;
const { MINUS, PERIOD, PLUS } = BYTE;

const TWO_TO_53 = 2 ** 53;

const {
  codes: ASDF_CODE,
  SQZ: CODE_SQZ,
  DIF: CODE_DIF,
  SEPARATOR: CODE_SEPARATOR,
  KIND: CODE_KIND,
  NEGATIVE: CODE_NEGATIVE,
  OTHER: CODE_OTHER,
} = ASDF;

/**
 * Decodes one ordinary ASDF data line — an AFFN X followed only by SQZ, DIF and DUP tokens — in
 * one pass over its bytes, straight into the ordinate buffer. It gives the same values as the
 * general token loop (the same integer arithmetic in the same order) but never reports an error:
 * at anything unusual (AFFN ordinates, exponents, '?', a decimal point, a DIF or DUP opening the
 * line, DUP after DUP, a failed Y check, the point limit, an overflow) it returns false without
 * changing the stream, and the general loop decodes the line again and words the error. A line it
 * accepts has only letter-led tokens after the X, so it can never be an AFFN line with exponents.
 *
 * @returns true when the line was decoded (X in `lineX`), false to leave it to the general loop
 */
export function decodeAsdfLineFast(
  bytes: Uint8Array,
  start: number,
  end: number,
  stream: OrdinateStream,
  cursor: ScanCursor,
  lineX: LineX,
): boolean {
  const c0 = bytes[start] as number;
  if (!((c0 >= 0x30 && c0 <= 0x39) || c0 === PERIOD || c0 === PLUS || c0 === MINUS)) return false;
  const x = scanNumber(bytes, start, end, DECIMAL_POINT_NO_EXPONENT, cursor);
  const xEnd = cursor.end;
  if (xEnd === start || !Number.isFinite(x)) return false;
  if (end >= bytes.length || ((bytes[end] as number) - 0x30) >>> 0 <= 9) return false;
  const out = stream.out;
  const maxPoints = stream.maxPoints;
  let values = out.values;
  let length = out.length;
  // Every token but a DUP adds at most one ordinate and takes at least one byte.
  if (values.length < length + (end - xEnd)) {
    const bigger = new Float64Array(Math.max(values.length * 2, length + (end - xEnd)));
    bigger.set(values.subarray(0, length));
    values = bigger;
  }
  let previous = stream.previous;
  let lastKind = stream.lastKind;
  let lastDifference = stream.lastDifference;
  const yCheck = stream.yCheckPending;
  let count = 0;
  let lastWasDup = false;
  let i = xEnd;
  while (i < end) {
    const code = ASDF_CODE[bytes[i] as number] as number;
    if (code >= CODE_OTHER) return false;
    i++;
    const kind = code & CODE_KIND;
    if (kind === CODE_SEPARATOR) continue;
    let magnitude = code & 0x0f;
    // bytes[end] is a non-digit (checked above), so the digits stop by themselves. A decimal
    // point after the digits is a byte of class other and ends the fast decoding below.
    for (;;) {
      const digit = (bytes[i] as number) - 0x30;
      if (digit >>> 0 > 9) break;
      magnitude = magnitude * 10 + digit;
      i++;
    }
    // Beyond 2^53 the general loop decodes the same arithmetic and checks for overflow.
    if (magnitude > TWO_TO_53) return false;
    // A negative lead's magnitude is at least 1, so no −0 arises.
    const value = (code & CODE_NEGATIVE) === 0 ? magnitude : -magnitude;
    if (kind === CODE_DIF) {
      if (count === 0 || length >= maxPoints) return false;
      lastDifference = value;
      previous = previous + value;
      values[length++] = previous;
      lastKind = DIFFERENCE;
      lastWasDup = false;
      count++;
    } else if (kind === CODE_SQZ) {
      if (count === 0 && yCheck) {
        if (value !== values[length - 1]) return false;
      } else {
        if (length >= maxPoints) return false;
        values[length++] = value;
      }
      previous = value;
      lastKind = ABSOLUTE;
      lastWasDup = false;
      count++;
    } else {
      if (count === 0 || lastWasDup || value < 1 || length + value - 1 > maxPoints) return false;
      const needed = length + value - 1 + (end - i);
      if (values.length < needed) {
        const bigger = new Float64Array(Math.max(values.length * 2, needed));
        bigger.set(values.subarray(0, length));
        values = bigger;
      }
      if (lastKind === DIFFERENCE) {
        for (let k = 1; k < value; k++) {
          previous = previous + lastDifference;
          values[length++] = previous;
        }
      } else {
        for (let k = 1; k < value; k++) values[length++] = previous;
      }
      count += value - 1;
      lastWasDup = true;
    }
  }
  if (count === 0) return false;
  out.values = values;
  out.length = length;
  stream.previous = previous;
  stream.lastKind = lastKind;
  stream.lastDifference = lastDifference;
  stream.ordinatesOnLine = count;
  stream.yCheckPending = lastKind === DIFFERENCE;
  lineX.x = x;
  lineX.printedUnit = printedUnitOf(bytes, start, xEnd);
  return true;
}
