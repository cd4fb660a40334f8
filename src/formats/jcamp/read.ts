/**
 * Reader for JCAMP-DX infrared spectra (versions 4.24 and 5.x), the IUPAC open format for
 * infrared spectra (McDonald & Wilks, Applied Spectroscopy 42 (1988) 151; JCAMP-DX 5.01).
 *
 * It validates what other readers take on trust; each part lives in its own file:
 * - `records.ts`: labelled data records, `$$` comments, what may follow `##END=`;
 * - `blocks.ts`: the blocks of compound files and what a file holds (one infrared spectrum, or
 *   something refused as `UNSUPPORTED`);
 * - `header.ts`: file structure, declared abscissae, counts and factors, metadata;
 *   `units.ts` the axis units (XUNITS, YUNITS, `##$Y KIND`); `sample-labels.ts` the sample
 *   conditions with their unit conventions and `$$` unit comments;
 * - `xydata.ts`: `##XYDATA=(X++(Y..Y))`, decoded line by line by `asdf-fast.ts` (ordinary ASDF
 *   lines in one pass) or `asdf.ts` (every form, every error), with the decoder state in
 *   `ordinate-stream.ts`; NPOINTS, DELTAX and the X at each line start are checked there;
 * - `xypoints.ts`: `##XYPOINTS=(XY..XY)` AFFN pairs;
 * - `ordinates.ts`: YFACTOR scaling, the FIRSTY check, the range a y unit allows.
 *
 * The result always ascends in cm⁻¹. Reading keeps no state between files except in a
 * {@link JcampReader}, whose buffers belong to the caller that made it.
 */
import { BandwrightError } from '../../errors.js';
import {
  makeSpectrum,
  spectrumFromCheckedArrays,
  type ReadWarning,
  type Spectrum,
} from '../../spectrum/spectrum.js';
import { BYTE, checkedText } from '../bytes.js';
import { pointLimit, wavelengthsToWavenumbers } from '../reader-checks.js';
import { readHeader } from './header.js';
import { infraredBlock, splitBlocks } from './blocks.js';
import { reviewOrdinates } from './ordinates.js';
import { splitRecords, textAfterEnd } from './records.js';
import { readXyData, type XyDataBuffers } from './xydata.js';
import { readXyPoints } from './xypoints.js';

/** Options of {@link parseJcamp} and {@link JcampReader.read}. */
export interface JcampOptions {
  /** Label used in messages and stored as `metadata.source`, e.g. the path as the user gave it. */
  source: string;
  /** Most data points accepted before a `LIMIT` error; default 2,000,000. */
  maxPoints?: number;
}

/** Options of a {@link JcampReader}. */
export interface JcampReaderOptions {
  /**
   * Return x and y of an `##XYDATA` table as views on this reader's buffers, which its next read
   * overwrites (default false: arrays of their own). For callers done with a spectrum before they
   * read the next, such as a batch, it saves two allocations a file.
   */
  reuseOutput?: boolean;
}

/**
 * A JCAMP-DX reader that keeps its decoding buffers from one file to the next (a batch reads
 * thousands). Each reader owns its buffers: two readers never share state, so reads on different
 * readers may interleave freely; with `reuseOutput`, a spectrum it returned is valid until this
 * reader's next read.
 *
 * @example
 * const reader = new JcampReader({ reuseOutput: true });
 * for (const bytes of files) quantify(reader.read(bytes, { source: 'scan.jdx' }));
 */
export class JcampReader {
  readonly #buffers: XyDataBuffers = { ordinates: new Float64Array(0), x: new Float64Array(0) };
  readonly #reuseOutput: boolean;

  /** @param options - whether spectra may be views on the reader's buffers */
  constructor(options: JcampReaderOptions = {}) {
    this.#reuseOutput = options.reuseOutput === true;
  }

  /**
   * Parses one JCAMP-DX spectrum, as {@link parseJcamp} does, with this reader's buffers.
   *
   * @param input - the file content as bytes (UTF-8/ASCII) or text
   * @param options - source label for messages and metadata; point limit
   * @returns the spectrum (see {@link parseJcamp}); with `reuseOutput`, x and y of an XYDATA
   *   table are views valid until this reader's next read
   * @throws BandwrightError as {@link parseJcamp}
   */
  read(input: Uint8Array | string, options: JcampOptions): Spectrum {
    return readJcamp(input, options, this.#buffers, this.#reuseOutput);
  }
}

/**
 * Parses one JCAMP-DX spectrum.
 *
 * @param input - the file content as bytes (UTF-8/ASCII) or text
 * @param options - source label for messages and metadata; point limit
 * @returns the spectrum on ascending wavenumbers (cm⁻¹) with `metadata.format = 'jcamp'`, the
 *   title, date text and sample conditions converted to m, K, kPa (resolution in cm⁻¹), the read
 *   warnings, and the count of saturated (NaN) points
 * @throws BandwrightError `UNSUPPORTED` (a file that holds something other than one infrared
 *   spectrum, or y values that are not absorbance or transmittance; `location.content` says what),
 *   `PARSE` (structure, labels, data syntax, NPOINTS, line X beyond its tolerance, FIRSTY),
 *   `YCHECK` (DIF check value mismatch), `INVALID_VALUE` (bad label values, a fraction-scale
 *   transmittance with many values above 1.5), `NOT_MONOTONIC`, `LIMIT`. Messages name the line;
 *   what was accepted leniently is in `metadata.warnings`.
 * @example
 * const spectrum = parseJcamp(readFileSync('co.jdx'), { source: 'co.jdx' });
 */
export function parseJcamp(input: Uint8Array | string, options: JcampOptions): Spectrum {
  return readJcamp(input, options, { ordinates: new Float64Array(0), x: new Float64Array(0) }, false);
}

function readJcamp(
  input: Uint8Array | string,
  options: JcampOptions,
  buffers: XyDataBuffers,
  reuseOutput: boolean,
): Spectrum {
  const source = options.source;
  const maxPoints = pointLimit(options.maxPoints);
  const early: ReadWarning[] = [];
  const bytes = checkedText(
    withLineFeeds(typeof input === 'string' ? new TextEncoder().encode(input) : input, source, early),
    source,
  );
  const { records: allRecords, trailing, junk, leading } = splitRecords(bytes, source);
  const { block, compoundNote } = infraredBlock(splitBlocks(allRecords), source);
  if (junk !== undefined) throw textAfterEnd(source, junk);
  const records = block.records;
  if (leading !== undefined) {
    early.push({
      code: 'leading-bytes',
      message: `${source} line 1: ${JSON.stringify(leading)} before ##TITLE=, skipped`,
    });
  }
  if (compoundNote !== undefined) early.push({ code: 'compound-block', message: compoundNote });
  if (trailing !== undefined) {
    early.push({
      code: 'trailing-bytes',
      message:
        `${source} line ${trailing.line}: ${trailing.bytes} byte(s) of padding after the last ##END= ` +
        '(an end-of-file mark, NUL or spaces), ignored',
    });
  }
  const header = readHeader(records, source);
  header.warnings.unshift(...early);
  const xyData = records.find((r) => r.key === 'XYDATA');
  const xyPoints = records.find((r) => r.key === 'XYPOINTS');
  if (xyData !== undefined && xyPoints !== undefined) {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${xyPoints.line}: both ##XYDATA (line ${xyData.line}) and ##XYPOINTS; a single ` +
        `spectrum has one data table`,
      {
        file: source,
        line: xyPoints.line,
      },
    );
  }
  if (header.nPoints !== undefined && header.nPoints > maxPoints) {
    throw new BandwrightError(
      'LIMIT',
      `${source}: ##NPOINTS=${header.nPoints}, more than ${maxPoints} data points, the limit ` +
        `(maxPoints; BANDWRIGHT_MAX_POINTS raises it)`,
      { file: source },
    );
  }
  let x: Float64Array;
  let y: Float64Array;
  // Set when the XYDATA reading has already seen finite, strictly monotonic x and finite y.
  let checked = false;
  if (xyData !== undefined)
    ({ x, y, checked } = readXyData(bytes, xyData, header, source, maxPoints, buffers, reuseOutput));
  else if (xyPoints !== undefined) ({ x, y } = readXyPoints(bytes, xyPoints, header, source, maxPoints));
  else {
    const peaks = records.find((r) => r.key === 'PEAKTABLE');
    throw new BandwrightError(
      'PARSE',
      peaks !== undefined
        ? `${source} line ${peaks.line}: ##PEAK TABLE is a list of peaks, not a spectrum; a spectrum ` +
            `needs ##XYDATA or ##XYPOINTS`
        : `${source}: no ##XYDATA= or ##XYPOINTS= data table`,
      { file: source },
    );
  }
  if (header.xUnit !== 'cm-1') {
    checked = false;
    wavelengthsToWavenumbers(x, header.xUnit, source);
  }
  if (x.length >= 2 && (x[1] as number) < (x[0] as number)) {
    x.reverse();
    y.reverse();
  }
  const { yKind, saturatedPoints } = reviewOrdinates(x, y, header.yKind, source, header.warnings);
  const metadata = header.metadata;
  if (saturatedPoints > 0) metadata.saturatedPoints = saturatedPoints;
  if (header.warnings.length > 0) metadata.warnings = header.warnings;
  const init: Spectrum = { x, y, yKind, metadata };
  // Reversal keeps x strictly monotonic; anything the reading did not vouch for, and every
  // failure message, goes through makeSpectrum's full checks.
  return checked && yKind !== 'single-beam' ? spectrumFromCheckedArrays(init) : makeSpectrum(init);
}

/**
 * Text whose lines end with CR alone (an old Mac OS export) as LF-ended lines, with a warning;
 * other text unchanged.
 */
function withLineFeeds(bytes: Uint8Array, source: string, warnings: ReadWarning[]): Uint8Array {
  if (bytes.indexOf(BYTE.LF) >= 0 || bytes.indexOf(BYTE.CR) < 0) return bytes;
  warnings.push({
    code: 'line-ends',
    message: `${source}: lines end with CR alone (an old Mac OS export); read as line ends`,
  });
  return bytes.map((b) => (b === BYTE.CR ? BYTE.LF : b));
}
