/**
 * Decimal numbers read straight from bytes, correctly rounded, without making a string per value.
 *
 * Fast path (Clinger 1990, "How to read floating point numbers accurately"): when the digits,
 * read as one integer m, stay below 2^53, m is exact as a double; when the decimal exponent e
 * satisfies |e| ≤ 22, 10^|e| is exact as well, so m·10^e or m/10^−e is one IEEE operation and
 * therefore correctly rounded. Every other literal (more digits, larger
 * exponents, subnormals) falls back to `Number(text)`, which ECMAScript requires to be correctly
 * rounded. The syntax is checked here first, so `Number` only ever sees a plain decimal literal.
 */

/** How a number is written: which byte is the decimal separator and whether `e`/`E` exponents are allowed. */
export interface NumberSyntax {
  /** Decimal separator byte: 0x2e `.` or 0x2c `,`. */
  readonly decimalByte: number;
  /** Whether an exponent (`1.5e-3`) may follow the mantissa. */
  readonly exponent: boolean;
}

/** Decimal point, exponents allowed: `-1.25e-3`. */
export const DECIMAL_POINT: NumberSyntax = Object.freeze({ decimalByte: 0x2e, exponent: true });
/** Decimal comma, exponents allowed: `-1,25e-3`. */
export const DECIMAL_COMMA: NumberSyntax = Object.freeze({ decimalByte: 0x2c, exponent: true });
/** Decimal point, no exponent (JCAMP-DX ASDF lines, where `E`/`e` are compression characters). */
export const DECIMAL_POINT_NO_EXPONENT: NumberSyntax = Object.freeze({ decimalByte: 0x2e, exponent: false });

/** Where a scan stopped; reused by callers so the hot loop allocates nothing. */
export interface ScanCursor {
  /** Index of the first byte after the number (equal to the start when no number was found). */
  end: number;
}

// Parsed from literals, which are correctly rounded (1e0 … 1e22 are exact doubles).
const EXACT_POWERS_OF_TEN: readonly number[] = Array.from({ length: 23 }, (_, i) => Number(`1e${i}`));
const TWO_TO_53 = 2 ** 53;

/**
 * Reads one decimal number starting exactly at `start` (no leading blanks are skipped):
 * `[+-]? digits* (sep digits*)? ([eE] [+-]? digits+)?` with at least one mantissa digit.
 *
 * @param bytes - the text, as bytes (ASCII digits)
 * @param start - index of the first byte of the number
 * @param limit - index one past the last byte that may belong to the number
 * @param syntax - decimal separator and whether exponents are allowed
 * @param cursor - receives the index one past the number; equals `start` when no number was read
 * @returns the correctly rounded double (±Infinity when the literal overflows), or NaN when no
 *   number starts at `start`. An exponent marker not followed by digits is not consumed.
 */
export function scanNumber(
  bytes: Uint8Array,
  start: number,
  limit: number,
  syntax: NumberSyntax,
  cursor: ScanCursor,
): number {
  let i = start;
  let negative = false;
  if (i < limit) {
    const sign = bytes[i] as number;
    if (sign === 0x2d) {
      negative = true;
      i++;
    } else if (sign === 0x2b) i++;
  }
  // All digits go into one integer mantissa; it is exact while it stays below 2^53 (it only
  // grows, so a final value below 2^53 means every step was exact).
  let mantissa = 0;
  const integerStart = i;
  while (i < limit) {
    const digit = (bytes[i] as number) - 0x30;
    if (digit >>> 0 > 9) break;
    mantissa = mantissa * 10 + digit;
    i++;
  }
  let digits = i - integerStart;
  let fractionDigits = 0;
  if (i < limit && bytes[i] === syntax.decimalByte) {
    i++;
    const fractionStart = i;
    while (i < limit) {
      const digit = (bytes[i] as number) - 0x30;
      if (digit >>> 0 > 9) break;
      mantissa = mantissa * 10 + digit;
      i++;
    }
    fractionDigits = i - fractionStart;
    digits += fractionDigits;
  }
  if (digits === 0) {
    cursor.end = start;
    return Number.NaN;
  }
  let exponent = 0;
  if (syntax.exponent && i < limit && (bytes[i] === 0x65 || bytes[i] === 0x45)) {
    exponent = scanExponent(bytes, i, limit, cursor);
    i = cursor.end;
  }
  cursor.end = i;
  if (mantissa === 0) return negative ? -0 : 0;
  if (mantissa < TWO_TO_53) {
    const power = exponent - fractionDigits;
    if (power >= 0) {
      if (power <= 22) {
        const value = mantissa * (EXACT_POWERS_OF_TEN[power] as number);
        return negative ? -value : value;
      }
    } else if (power >= -22) {
      const value = mantissa / (EXACT_POWERS_OF_TEN[-power] as number);
      return negative ? -value : value;
    }
  }
  return slowValue(bytes, start, i, syntax);
}

/**
 * Reads `[eE][+-]?digits` at `marker`; returns the exponent and sets `cursor.end` past it (or at
 * the marker when no digits follow).
 */
function scanExponent(bytes: Uint8Array, marker: number, limit: number, cursor: ScanCursor): number {
  let j = marker + 1;
  let negative = false;
  if (j < limit) {
    const sign = bytes[j];
    if (sign === 0x2d) {
      negative = true;
      j++;
    } else if (sign === 0x2b) j++;
  }
  const digitsStart = j;
  let exponent = 0;
  while (j < limit) {
    const digit = (bytes[j] as number) - 0x30;
    if (digit >>> 0 > 9) break;
    if (exponent < 100_000) exponent = exponent * 10 + digit;
    j++;
  }
  if (j === digitsStart) {
    cursor.end = marker;
    return 0;
  }
  cursor.end = j;
  return negative ? -exponent : exponent;
}

/** Correctly rounded fallback: the validated literal as a JavaScript string, given to `Number`. */
function slowValue(bytes: Uint8Array, start: number, end: number, syntax: NumberSyntax): number {
  const text = String.fromCharCode.apply(null, bytes.subarray(start, end) as unknown as number[]);
  return Number(syntax.decimalByte === 0x2e ? text : text.replace(',', '.'));
}

/**
 * Parses a whole string as one decimal number (surrounding blanks allowed), with the same rules
 * and rounding as {@link scanNumber}.
 *
 * @param text - e.g. `"1.5e-3"` or, with {@link DECIMAL_COMMA}, `"1,5"`
 * @param syntax - decimal separator and exponent rule; default {@link DECIMAL_POINT}
 * @returns the value (±Infinity on overflow), or NaN when the text is not exactly one number
 */
export function parseNumberText(text: string, syntax: NumberSyntax = DECIMAL_POINT): number {
  const trimmed = text.trim();
  if (trimmed === '') return Number.NaN;
  const bytes = new Uint8Array(trimmed.length);
  for (let k = 0; k < trimmed.length; k++) {
    const code = trimmed.charCodeAt(k);
    if (code > 0x7f) return Number.NaN;
    bytes[k] = code;
  }
  const cursor: ScanCursor = { end: 0 };
  const value = scanNumber(bytes, 0, bytes.length, syntax, cursor);
  return cursor.end === bytes.length ? value : Number.NaN;
}
