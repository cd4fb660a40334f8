/**
 * Decoder state across the data lines of one `##XYDATA` table: the ordinates decoded so far (as
 * written, before YFACTOR), the last value and its form (absolute or difference) for DUP and DIF,
 * and the Y check that opens a line after a line ending in DIF form. Both line decoders, the
 * single-pass one and the general token loop, advance the same state.
 */
import { BandwrightError } from '../../errors.js';
import { BYTE } from '../bytes.js';
import { parseNumberText } from '../number-parse.js';

const { PERIOD } = BYTE;

/** Forms of an ordinate as written: absolute (AFFN or SQZ) or a difference (DIF). */
export const ORDINATE_FORM: Readonly<{ ABSOLUTE: number; DIFFERENCE: number }> = Object.freeze({
  ABSOLUTE: 0,
  DIFFERENCE: 1,
});
const { ABSOLUTE } = ORDINATE_FORM;

/** Growing output buffer for decoded ordinates. */
export class Ordinates {
  values: Float64Array;
  length = 0;
  /**
   * @param capacity - values expected
   * @param reuse - a buffer to start in when long enough (its content is overwritten)
   */
  constructor(capacity: number, reuse?: Float64Array) {
    this.values =
      reuse !== undefined && reuse.length >= capacity ? reuse : new Float64Array(Math.max(16, capacity));
  }
  /** Appends one value, doubling the buffer when full. */
  push(value: number): void {
    if (this.length === this.values.length) {
      const bigger = new Float64Array(this.values.length * 2);
      bigger.set(this.values);
      this.values = bigger;
    }
    this.values[this.length++] = value;
  }
}

/**
 * Decoder state across the data lines of one `##XYDATA` table. `emit` adds one ordinate, or checks
 * it when it is the Y-check value that opens a line after a line ending in DIF form.
 */
export class OrdinateStream {
  readonly out: Ordinates;
  readonly maxPoints: number;
  /** The previous line ended in DIF form, so this line's first ordinate repeats its last. */
  yCheckPending = false;
  /** Last ordinate of the current line (or the Y-check value). */
  previous = 0;
  lastKind = ABSOLUTE;
  lastDifference = 0;
  ordinatesOnLine = 0;
  /** Set when a Y-check value disagrees: [found, expected]. */
  mismatch: [number, number] | undefined;
  /**
   * @param capacity - ordinates expected
   * @param maxPoints - most ordinates accepted
   * @param reuse - a buffer to decode into when long enough
   */
  constructor(capacity: number, maxPoints: number, reuse?: Float64Array) {
    this.out = new Ordinates(capacity, reuse);
    this.maxPoints = maxPoints;
  }
  /** Starts a data line. */
  startLine(): void {
    this.ordinatesOnLine = 0;
  }
  /** @returns false when the point limit is reached or a Y check fails (see `mismatch`). */
  emit(value: number, kind: number): boolean {
    if (this.ordinatesOnLine === 0 && this.yCheckPending) {
      const expected = this.out.values[this.out.length - 1] as number;
      if (value !== expected) {
        this.mismatch = [value, expected];
        return false;
      }
    } else {
      if (this.out.length >= this.maxPoints) return false;
      this.out.push(value);
    }
    this.previous = value;
    this.lastKind = kind;
    this.ordinatesOnLine++;
    return true;
  }
}

/** The X that opens a data line as written (before XFACTOR), with one unit of its last printed digit. */
export interface LineX {
  x: number;
  printedUnit: number;
}

/**
 * Throws an error about a data line.
 *
 * @throws BandwrightError with the given code, naming the source and line
 */
export function dataError(source: string, line: number, code: 'PARSE' | 'LIMIT', message: string): never {
  throw new BandwrightError(code, `${source} line ${line}: ${message}`, { file: source, line });
}

/**
 * Throws the error behind a refused `emit`: the Y-check mismatch, or else the point limit.
 *
 * @throws BandwrightError `YCHECK` or `LIMIT`
 */
export function emitError(stream: OrdinateStream, source: string, line: number): never {
  if (stream.mismatch !== undefined) {
    const [found, expected] = stream.mismatch;
    throw new BandwrightError(
      'YCHECK',
      `${source} line ${line}: Y-check value ${found} differs from the last ordinate of the previous ` +
        `data line (${expected}); the DIF data are corrupt or a line is missing`,
      { file: source, line },
    );
  }
  return dataError(
    source,
    line,
    'LIMIT',
    `more than ${stream.maxPoints} data points, the limit (maxPoints; BANDWRIGHT_MAX_POINTS raises it)`,
  );
}

/** 10^0 … 10^-22 as correctly rounded literals. */
const NEGATIVE_POWERS_OF_TEN: readonly number[] = Array.from({ length: 23 }, (_, k) => Number(`1e-${k}`));

/**
 * One unit of the last printed digit of the AFFN literal in bytes[start, end).
 *
 * @returns 1 for "4000", 0.01 for "3999.04", 1e-3 for "4.5E-2"
 */
export function printedUnitOf(bytes: Uint8Array, start: number, end: number): number {
  let fraction = -1;
  let exponent = 0;
  for (let i = start; i < end; i++) {
    const c = bytes[i] as number;
    if (c === PERIOD) fraction = 0;
    else if (c === 0x45 || c === 0x65) {
      exponent = parseNumberText(
        String.fromCharCode.apply(null, bytes.subarray(i + 1, end) as unknown as number[]),
      );
      break;
    } else if (fraction >= 0 && c >= 0x30 && c <= 0x39) fraction++;
  }
  const power = (Number.isFinite(exponent) ? exponent : 0) - Math.max(0, fraction);
  // Plain decimals (once per data line): a table of 10^-k instead of a pow call.
  return power <= 0 && power > -NEGATIVE_POWERS_OF_TEN.length
    ? (NEGATIVE_POWERS_OF_TEN[-power] as number)
    : 10 ** power;
}
