/**
 * `##XYDATA=(X++(Y..Y))`: evenly spaced abscissae from FIRSTX, LASTX, DELTAX and the count, and
 * one line per run of ordinates, each opening with the X of its first ordinate. Checked: the
 * decoded count against `##NPOINTS`, `##DELTAX` against FIRSTX/LASTX (the whole span may disagree
 * by at most half a step), and the X at the start of each line against FIRSTX + i·DELTAX.
 */
import { BandwrightError } from '../../errors.js';
import { BYTE } from '../bytes.js';
import type { ScanCursor } from '../number-parse.js';
import { decodeDataLine, type DataLine } from './asdf.js';
import { decodeAsdfLineFast } from './asdf-fast.js';
import type { JcampHeader } from './header.js';
import { OrdinateStream, type LineX } from './ordinate-stream.js';
import { assertFirstY, scaleOrdinates } from './ordinates.js';
import { commentStart, type JcampRecord } from './records.js';

const { CR, DOLLAR, LF, SPACE, TAB } = BYTE;

/**
 * Buffers kept from one `##XYDATA` table to the next by the reader that owns them (a batch reads
 * thousands of files), so that a table costs no allocation for its decoding.
 */
export interface XyDataBuffers {
  /** The Y values as written, decoded; not kept above {@link KEPT_ORDINATES_LIMIT} values. */
  ordinates: Float64Array;
  /** The abscissae of the last table, when the output may be views on these buffers. */
  x: Float64Array;
}

/** The largest decoding buffer kept for the next table, in values. */
const KEPT_ORDINATES_LIMIT = 1 << 18;

/**
 * Room beyond the declared count in a new decoding buffer: the single-pass decoder makes room for
 * a whole line before decoding it (one value per byte at most), so without it the last lines of
 * a table would double the buffer.
 */
const LINE_ROOM = 256;

/** The X that opens a data line, where it is, and which point it belongs to. */
interface LineStart {
  line: number;
  /** X as written (before XFACTOR). */
  x: number;
  /** 0-based index of the line's first ordinate. */
  index: number;
  /** One unit of the last printed digit of X, as written. */
  printedUnit: number;
}

/**
 * Decodes the data lines of the table into the buffers' ordinate buffer.
 *
 * @returns the Y values as written (a view on `buffers.ordinates`, valid until its next decoding)
 *   and the X that opens each line
 */
function decodeXyData(
  bytes: Uint8Array,
  record: JcampRecord,
  header: JcampHeader,
  source: string,
  maxPoints: number,
  buffers: XyDataBuffers,
): { written: Float64Array; lineStarts: LineStart[] } {
  const format = record.value.toUpperCase().replace(/\s+/g, '');
  if (format !== '(X++(Y..Y))') {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${record.line}: ##XYDATA=${record.value} not supported; only (X++(Y..Y))`,
      { file: source, line: record.line },
    );
  }
  const capacity = header.nPoints === undefined ? 1024 : header.nPoints + LINE_ROOM;
  const stream = new OrdinateStream(capacity, maxPoints, buffers.ordinates);
  const lineStarts: LineStart[] = [];
  const cursor: ScanCursor = { end: 0 };
  const lineX: LineX = { x: 0, printedUnit: 0 };
  const line: DataLine = { source, number: record.line, start: 0 };
  let pos = record.dataStart;
  const stop = record.dataEnd;
  // Next `$`, `e` and `E` at or after the current line (-1: none left), found by indexOf so that
  // lines without them are not scanned byte by byte for a comment or an exponent.
  let nextDollar = bytes.indexOf(DOLLAR, pos);
  let nextLowerE = bytes.indexOf(0x65, pos);
  let nextUpperE = bytes.indexOf(0x45, pos);
  while (pos < stop) {
    line.number++;
    let lineEnd = bytes.indexOf(LF, pos);
    if (lineEnd < 0 || lineEnd > stop) lineEnd = stop;
    let end = lineEnd;
    if (end > pos && bytes[end - 1] === CR) end--;
    const lineStart = pos;
    pos = lineEnd + 1;
    if (nextDollar >= 0 && nextDollar < lineStart) nextDollar = bytes.indexOf(DOLLAR, lineStart);
    const hash = nextDollar >= 0 && nextDollar < end ? commentStart(bytes, nextDollar, end) : -1;
    if (hash >= 0) end = hash;
    let p = lineStart;
    while (p < end && (bytes[p] === SPACE || bytes[p] === TAB)) p++;
    while (end > p && (bytes[end - 1] === SPACE || bytes[end - 1] === TAB)) end--;
    if (p === end) continue;
    stream.startLine();
    const lineBase = stream.out.length;
    const lineIndex = stream.yCheckPending ? lineBase - 1 : lineBase;
    if (!decodeAsdfLineFast(bytes, p, end, stream, cursor, lineX)) {
      if (nextLowerE >= 0 && nextLowerE < p) nextLowerE = bytes.indexOf(0x65, p);
      if (nextUpperE >= 0 && nextUpperE < p) nextUpperE = bytes.indexOf(0x45, p);
      const mayHaveExponent = (nextLowerE >= 0 && nextLowerE < end) || (nextUpperE >= 0 && nextUpperE < end);
      line.start = lineStart;
      decodeDataLine(bytes, p, end, mayHaveExponent, stream, cursor, line, lineX);
    }
    lineStarts.push({ line: line.number, x: lineX.x, index: lineIndex, printedUnit: lineX.printedUnit });
  }
  if (stream.out.values.length <= KEPT_ORDINATES_LIMIT) buffers.ordinates = stream.out.values;
  return { written: stream.out.values.subarray(0, stream.out.length), lineStarts };
}

/** The x step of the table from the header and the decoded count, checking DELTAX against LASTX. */
function stepOf(header: JcampHeader, n: number, source: string): number {
  const firstX = (header.firstX as { value: number }).value;
  let step: number;
  if (header.lastX !== undefined) {
    step = (header.lastX.value - firstX) / (n - 1);
    if (header.deltaX !== undefined) {
      const span = Math.abs(firstX + (n - 1) * header.deltaX - header.lastX.value);
      if (!(span <= 0.5 * Math.abs(step))) {
        throw new BandwrightError(
          'PARSE',
          `${source}: ##DELTAX=${header.deltaX} disagrees with ##FIRSTX=${firstX}, ` +
            `##LASTX=${header.lastX.value} and ${n} points (which give ${step}); FIRSTX + ` +
            `(n−1)·DELTAX misses LASTX by ${span}`,
          { file: source, parameter: 'DELTAX' },
        );
      }
    }
  } else if (header.deltaX !== undefined) step = header.deltaX;
  else
    throw new BandwrightError(
      'PARSE',
      `${source}: neither ##LASTX= nor ##DELTAX= given, the x spacing of ##XYDATA is unknown`,
      { file: source, parameter: 'DELTAX' },
    );
  if (!(step !== 0 && Number.isFinite(step))) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `${source}: ##FIRSTX and ##LASTX give an x step of ${step}, must be non-zero`,
      { file: source },
    );
  }
  return step;
}

/**
 * Checks the X at the start of each data line against FIRSTX + i·step, within 0.1·|step| plus
 * half a unit of the last digit printed in that X (times XFACTOR), since writers round it.
 *
 * @throws BandwrightError `PARSE` at the first line whose X is off, naming the line
 */
function assertLineStartsOnGrid(
  lineStarts: readonly LineStart[],
  firstX: number,
  step: number,
  xFactor: number,
  source: string,
): void {
  for (const start of lineStarts) {
    const actual = start.x * xFactor;
    const expected = firstX + start.index * step;
    const tolerance =
      0.1 * Math.abs(step) + 0.5 * start.printedUnit * Math.abs(xFactor) + 1e-12 * Math.abs(expected);
    if (!(Math.abs(actual - expected) <= tolerance)) {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${start.line}: X = ${actual} at the start of the line, but point ` +
          `${start.index + 1} lies at FIRSTX + ${start.index}·DELTAX = ${expected} (tolerance ` +
          `${tolerance.toPrecision(3)}); points are missing or extra before this line, or DELTAX ` +
          `is wrong`,
        { file: source, line: start.line },
      );
    }
  }
}

/**
 * The abscissae FIRSTX + i·step, LASTX exactly at the end when given.
 *
 * @returns whether they are strictly monotonic and finite
 */
function fillAbscissae(
  xOut: Float64Array,
  n: number,
  firstX: number,
  step: number,
  header: JcampHeader,
): boolean {
  // x is checked for strict monotony as it is made (firstX + i·step can repeat a value when the
  // step is below the rounding of firstX), so makeSpectrum need not pass over it again.
  let monotonic = true;
  let previous = firstX;
  xOut[0] = firstX;
  if (step > 0) {
    for (let i = 1; i < n; i++) {
      const value = firstX + i * step;
      xOut[i] = value;
      if (!(value > previous)) monotonic = false;
      previous = value;
    }
  } else {
    for (let i = 1; i < n; i++) {
      const value = firstX + i * step;
      xOut[i] = value;
      if (!(value < previous)) monotonic = false;
      previous = value;
    }
  }
  if (header.lastX !== undefined) {
    const last = header.lastX.value;
    xOut[n - 1] = last;
    const before = xOut[n - 2] as number;
    if (!(step > 0 ? last > before : last < before)) monotonic = false;
  }
  // Strictly monotonic with finite ends means every x is finite.
  const last = xOut[n - 1] as number;
  return monotonic && firstX - firstX === 0 && last - last === 0;
}

/**
 * Reads an `##XYDATA=(X++(Y..Y))` table.
 *
 * @param bytes - file content
 * @param record - the XYDATA record
 * @param header - the file's header
 * @param source - label for messages
 * @param maxPoints - most points accepted
 * @param buffers - the reader's buffers (decoding, and the output when `reuseOutput`)
 * @param reuseOutput - return x and y as views on `buffers` (valid until their next use)
 * @returns x in the header's unit (times XFACTOR) and y (times YFACTOR) in file order, and whether
 *   x is finite and strictly monotonic and y finite (so the spectrum needs no second pass)
 * @throws BandwrightError `PARSE` (format, data syntax, NPOINTS, missing FIRSTX, spacing, line
 *   X, FIRSTY), `YCHECK`, `INVALID_VALUE` (zero step), `LIMIT`
 */
export function readXyData(
  bytes: Uint8Array,
  record: JcampRecord,
  header: JcampHeader,
  source: string,
  maxPoints: number,
  buffers: XyDataBuffers,
  reuseOutput: boolean,
): { x: Float64Array; y: Float64Array; checked: boolean } {
  const { written, lineStarts } = decodeXyData(bytes, record, header, source, maxPoints, buffers);
  const n = written.length;
  if (header.nPoints !== undefined && header.nPoints !== n) {
    throw new BandwrightError(
      'PARSE',
      `${source}: ##NPOINTS=${header.nPoints} but ##XYDATA (line ${record.line}) holds ${n} points; ` +
        `the data or the count is wrong`,
      {
        file: source,
        line: record.line,
        parameter: 'NPOINTS',
      },
    );
  }
  if (n < 2)
    throw new BandwrightError(
      'PARSE',
      `${source} line ${record.line}: ##XYDATA holds ${n} point(s), a spectrum needs at least 2`,
      { file: source, line: record.line },
    );
  if (header.firstX === undefined)
    throw new BandwrightError('PARSE', `${source}: ##FIRSTX= missing, ##XYDATA needs it`, {
      file: source,
      parameter: 'FIRSTX',
    });
  const firstX = header.firstX.value;
  const step = stepOf(header, n, source);
  assertLineStartsOnGrid(lineStarts, firstX, step, header.xFactor, source);
  // Scaled in place when the output may be a view on the decoding buffer.
  const y = reuseOutput ? written : new Float64Array(n);
  const yFinite = scaleOrdinates(written, n, header.yFactor, y);
  assertFirstY(header, y[0] as number, source);
  if (reuseOutput && buffers.x.length < n) buffers.x = new Float64Array(n);
  const x = reuseOutput ? buffers.x.subarray(0, n) : new Float64Array(n);
  const xChecked = fillAbscissae(x, n, firstX, step, header);
  return { x, y, checked: yFinite && xChecked };
}
