/**
 * `##XYDATA=(X++(Y..Y))`: evenly spaced abscissae from FIRSTX, LASTX, DELTAX and the count, and
 * one line per run of ordinates, each opening with the X of its first ordinate. Checked: the
 * decoded count against `##NPOINTS`, `##DELTAX` against FIRSTX/LASTX (the whole span may disagree
 * by at most half a step, or DELTAX is the step rounded or truncated to its printed digits), and the X at the
 * start of each line against FIRSTX + i·step, a cross-check of the count.
 */
import { BandwrightError } from '../../errors.js';
import type { ReadWarning } from '../../spectrum/spectrum.js';
import { BYTE } from '../bytes.js';
import type { ScanCursor } from '../number-parse.js';
import { decodeDataLine, type DataLine } from './asdf.js';
import { decodeAsdfLineFast } from './asdf-fast.js';
import type { JcampHeader } from './header.js';
import { OrdinateStream, type LineX } from './ordinate-stream.js';
import { checkFirstY, scaleOrdinates } from './ordinates.js';
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

/**
 * How far the X printed at a line start may stray from the header's grid, in steps, when the
 * point count is confirmed by ##NPOINTS or by DELTAX against LASTX: writers round or truncate it,
 * compute it from a rounded DELTAX, or start lines one step off. Beyond it the header and the
 * data cannot be reconciled.
 */
export const LINE_START_TOLERANCE_STEPS = 1.5;

/** Agreement of line-start X with the grid expected of every writer: a tenth of a step. */
const STRICT_LINE_START_STEPS = 0.1;

/**
 * The x step of the table from the header and the decoded count, checking DELTAX against LASTX.
 * A DELTAX that is the step rounded or truncated to its printed digits is accepted with a warning.
 *
 * @returns the step and whether DELTAX and LASTX together confirm the count
 */
function stepOf(header: JcampHeader, n: number, source: string): { step: number; countConfirmed: boolean } {
  const firstX = (header.firstX as { value: number }).value;
  let step: number;
  let countConfirmed = false;
  const deltaX = header.deltaX;
  if (header.lastX !== undefined) {
    step = (header.lastX.value - firstX) / (n - 1);
    if (deltaX !== undefined) {
      const span = Math.abs(firstX + (n - 1) * deltaX.value - header.lastX.value);
      countConfirmed = span <= 0.5 * Math.abs(step);
      if (!countConfirmed) {
        // Rounded or truncated: within one unit of its last printed digit (and 1 % of the step, so
        // that an integer DELTAX is not taken for a rounding of half its value).
        const difference = Math.abs(deltaX.value - step);
        const rounded = difference <= deltaX.unit * (1 + 1e-9) && difference <= 0.01 * Math.abs(step);
        if (!rounded && header.nPoints === undefined) {
          throw new BandwrightError(
            'PARSE',
            `${source}: ##DELTAX=${deltaX.value} disagrees with ##FIRSTX=${firstX}, ` +
              `##LASTX=${header.lastX.value} and ${n} points (which give ${step}); FIRSTX + ` +
              `(n−1)·DELTAX misses LASTX by ${span}, and no ##NPOINTS confirms the count`,
            { file: source, parameter: 'DELTAX' },
          );
        }
        // With NPOINTS confirming the count, FIRSTX, LASTX and the count define the grid, and the
        // line starts cross-check it; DELTAX is then only a (wrong) restatement.
        header.warnings.push({
          code: 'deltax',
          message: rounded
            ? `${source}: ##DELTAX=${deltaX.value} is the step rounded or truncated to its printed digits; ` +
              `##FIRSTX, ##LASTX and the ${n} points give ${step.toPrecision(8)}, used for the abscissae`
            : `${source}: ##DELTAX=${deltaX.value} disagrees with ##FIRSTX, ##LASTX and ##NPOINTS=${n}, ` +
              `which give ${step.toPrecision(8)}, used for the abscissae (the data line starts agree with it)`,
        });
      }
    }
  } else if (deltaX !== undefined) step = deltaX.value;
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
  return { step, countConfirmed: countConfirmed || header.nPoints !== undefined };
}

/**
 * Cross-checks the X at the start of each data line against FIRSTX + i·step. Within a tenth of a
 * step plus half a unit of the last digit printed in that X (times XFACTOR) it is silent; when
 * the count is confirmed, up to {@link LINE_START_TOLERANCE_STEPS} steps is accepted with one
 * warning saying how large the disagreement was.
 *
 * @throws BandwrightError `PARSE` at the first line whose X is off beyond what is accepted
 */
function checkLineStarts(
  lineStarts: readonly LineStart[],
  firstX: number,
  step: number,
  xFactor: number,
  countConfirmed: boolean,
  source: string,
  warnings: ReadWarning[],
): void {
  const allowedSteps = countConfirmed ? LINE_START_TOLERANCE_STEPS : STRICT_LINE_START_STEPS;
  let worst: { start: LineStart; off: number } | undefined;
  let beyondStrict = 0;
  for (const start of lineStarts) {
    const actual = start.x * xFactor;
    const expected = firstX + start.index * step;
    const rounding = 0.5 * start.printedUnit * Math.abs(xFactor) + 1e-12 * Math.abs(expected);
    const off = Math.abs(actual - expected);
    if (off <= STRICT_LINE_START_STEPS * Math.abs(step) + rounding) continue;
    if (!(off <= allowedSteps * Math.abs(step) + rounding)) {
      throw new BandwrightError(
        'PARSE',
        `${source} line ${start.line}: X = ${actual} at the start of the line, but point ` +
          `${start.index + 1} lies at FIRSTX + ${start.index}·DELTAX = ${expected}, ` +
          `${(off / Math.abs(step)).toPrecision(3)} steps away (accepted: ${allowedSteps}` +
          `${countConfirmed ? '' : `, or ${LINE_START_TOLERANCE_STEPS} when ##NPOINTS confirms the count`}); ` +
          'points are missing or extra before this line, or DELTAX is wrong',
        { file: source, line: start.line },
      );
    }
    beyondStrict++;
    if (worst === undefined || off > worst.off) worst = { start, off };
  }
  if (worst !== undefined) {
    warnings.push({
      code: 'line-start-x',
      message:
        `${source}: the X printed at ${beyondStrict} of ${lineStarts.length} data line starts strays from ` +
        `the header's grid by up to ${worst.off.toPrecision(3)} (${(worst.off / Math.abs(step)).toFixed(2)} ` +
        `steps, line ${worst.start.line}); the abscissae come from ##FIRSTX, ##LASTX and the point count`,
    });
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
  const { step, countConfirmed } = stepOf(header, n, source);
  checkLineStarts(lineStarts, firstX, step, header.xFactor, countConfirmed, source, header.warnings);
  // Scaled in place when the output may be a view on the decoding buffer.
  const y = reuseOutput ? written : new Float64Array(n);
  const yFinite = scaleOrdinates(written, n, header.yFactor, y);
  checkFirstY(header, y.subarray(0, n), source);
  if (reuseOutput && buffers.x.length < n) buffers.x = new Float64Array(n);
  const x = reuseOutput ? buffers.x.subarray(0, n) : new Float64Array(n);
  const xChecked = fillAbscissae(x, n, firstX, step, header);
  return { x, y, checked: yFinite && xChecked };
}
