/**
 * Decimal numbers read straight from bytes, correctly rounded, without making a string per value.
 *
 * Fast path (Clinger 1990, "How to read floating point numbers accurately"): a decimal with at
 * most 15 significant digits has an integer mantissa m < 10^15 < 2^53, exact as a double; when
 * the decimal exponent e satisfies |e| ≤ 22, 10^|e| is exact as well, so m·10^e or m/10^−e is one
 * IEEE operation and therefore correctly rounded. Every other literal (more digits, larger
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

const EXACT_POWERS_OF_TEN: readonly number[] = Array.from({ length: 23 }, (_, i) => 10 ** i);
const MAX_FAST_DIGITS = 15;

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
export function scanNumber(bytes: Uint8Array, start: number, limit: number, syntax: NumberSyntax, cursor: ScanCursor): number {
  let i = start;
  let negative = false;
  let c = i < limit ? (bytes[i] as number) : -1;
  if (c === 0x2d || c === 0x2b) {
    negative = c === 0x2d;
    i++;
  }
  let mantissa = 0;
  let significant = 0; // significant digits seen (leading zeros excluded)
  let digits = 0; // all mantissa digits seen
  let fractionDigits = 0; // digits after the separator that went into `mantissa` or were dropped
  while (i < limit) {
    c = bytes[i] as number;
    if (c < 0x30 || c > 0x39) break;
    digits++;
    if (significant > 0 || c !== 0x30) {
      significant++;
      if (significant <= MAX_FAST_DIGITS) mantissa = mantissa * 10 + (c - 0x30);
    }
    i++;
  }
  if (i < limit && bytes[i] === syntax.decimalByte) {
    i++;
    while (i < limit) {
      c = bytes[i] as number;
      if (c < 0x30 || c > 0x39) break;
      digits++;
      fractionDigits++;
      if (significant > 0 || c !== 0x30) {
        significant++;
        if (significant <= MAX_FAST_DIGITS) mantissa = mantissa * 10 + (c - 0x30);
      }
      i++;
    }
  }
  if (digits === 0) {
    cursor.end = start;
    return Number.NaN;
  }
  let exponent = 0;
  let exponentNegative = false;
  if (syntax.exponent && i < limit && (bytes[i] === 0x65 || bytes[i] === 0x45)) {
    let j = i + 1;
    const s = j < limit ? (bytes[j] as number) : -1;
    if (s === 0x2d || s === 0x2b) {
      exponentNegative = s === 0x2d;
      j++;
    }
    const exponentStart = j;
    while (j < limit) {
      c = bytes[j] as number;
      if (c < 0x30 || c > 0x39) break;
      if (exponent < 100_000) exponent = exponent * 10 + (c - 0x30);
      j++;
    }
    if (j > exponentStart) i = j;
  }
  cursor.end = i;
  if (significant === 0) return negative ? -0 : 0;
  if (significant <= MAX_FAST_DIGITS) {
    // With at most 15 significant digits every fraction digit went into the mantissa.
    const power = (exponentNegative ? -exponent : exponent) - fractionDigits;
    if (power >= 0 && power <= 22) {
      const value = mantissa * (EXACT_POWERS_OF_TEN[power] as number);
      return negative ? -value : value;
    }
    if (power < 0 && power >= -22) {
      const value = mantissa / (EXACT_POWERS_OF_TEN[-power] as number);
      return negative ? -value : value;
    }
  }
  return slowValue(bytes, start, i, syntax);
}

/** Correctly rounded fallback: the validated literal as a JavaScript string, given to `Number`. */
function slowValue(bytes: Uint8Array, start: number, end: number, syntax: NumberSyntax): number {
  let text = '';
  for (let k = start; k < end; k++) {
    const c = bytes[k] as number;
    text += c === syntax.decimalByte ? '.' : String.fromCharCode(c);
  }
  return Number(text);
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
