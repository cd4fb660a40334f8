/**
 * Reader for spectrum tables (CSV/TSV): an x column and one y column, or an x column and a
 * sample/background pair of single-beam columns. Bytes in, Float64Arrays out, one pass over the
 * data with no string made per value.
 *
 * Layout accepted, in order:
 * 1. an optional UTF-8 byte-order mark;
 * 2. blank lines and `#` comment lines, some of which set conditions (`conditions.ts`);
 * 3. an optional header line (present when its first cell is not a number) naming the columns,
 *    the y-kind and the x unit (`layout.ts`, which also detects delimiter and decimal separator);
 * 4. data lines, one point each, contiguous; blank lines may follow the data, nothing else
 *    (`rows.ts`).
 *
 * Wavelength columns are converted to wavenumbers; descending x is reversed so the result
 * ascends; a reversal or duplicate is an error. Reading keeps no state between files except in
 * a {@link SpectrumTableReader}, whose buffers belong to the caller that made it.
 */
import { BandwrightError } from '../../errors.js';
import { makeSpectrum, type Spectrum } from '../../spectrum/spectrum.js';
import { BYTE, checkedText } from '../bytes.js';
import { DECIMAL_COMMA, DECIMAL_POINT } from '../number-parse.js';
import { assertTransmittanceFraction, pointLimit, wavelengthsToWavenumbers } from '../reader-checks.js';
import { readPreamble } from './conditions.js';
import { readLayout, type TableLayoutOptions } from './layout.js';
import { readRows, type RowContext, type TableColumns } from './rows.js';

const { COMMA, LF, TAB } = BYTE;

/** Options of {@link parseSpectrumTable} and {@link SpectrumTableReader.read}: the layout options and a point limit. */
export interface SpectrumTableOptions extends TableLayoutOptions {
  /** Most data points accepted before a `LIMIT` error; default 2,000,000. */
  maxPoints?: number;
}

/** Options of a {@link SpectrumTableReader}. */
export interface SpectrumTableReaderOptions {
  /**
   * Return the columns as views on this reader's buffers, which its next read overwrites
   * (default false: arrays of their own). For callers done with a spectrum before they read the
   * next, such as a batch, it saves an allocation and a copy per column.
   */
  reuseOutput?: boolean;
}

/**
 * A spectrum-table reader that keeps its column buffers from one file to the next (a batch reads
 * thousands). Each reader owns its buffers: two readers never share state, so reads on different
 * readers may interleave freely; with `reuseOutput`, a spectrum it returned is valid until this
 * reader's next read.
 *
 * @example
 * const reader = new SpectrumTableReader({ reuseOutput: true });
 * for (const bytes of files) quantify(reader.read(bytes, { source: 'scan.csv' }));
 */
export class SpectrumTableReader {
  readonly #columns: TableColumns = emptyColumns();
  readonly #reuseOutput: boolean;

  /** @param options - whether spectra may be views on the reader's buffers */
  constructor(options: SpectrumTableReaderOptions = {}) {
    this.#reuseOutput = options.reuseOutput === true;
  }

  /**
   * Parses a spectrum table, as {@link parseSpectrumTable} does, with this reader's buffers.
   *
   * @param bytes - the file content (UTF-8 or ASCII; a BOM is skipped)
   * @param options - source label, y-kind, delimiter, decimal separator, point limit
   * @returns the spectrum (see {@link parseSpectrumTable}); with `reuseOutput`, its arrays are
   *   views valid until this reader's next read
   * @throws BandwrightError as {@link parseSpectrumTable}
   */
  read(bytes: Uint8Array, options: SpectrumTableOptions): Spectrum {
    return readSpectrumTable(bytes, options, this.#columns, this.#reuseOutput);
  }
}

function emptyColumns(): TableColumns {
  return { xs: new Float64Array(0), ys: new Float64Array(0), backgrounds: new Float64Array(0) };
}

/**
 * Parses a spectrum table from bytes.
 *
 * @param bytes - the file content (UTF-8 or ASCII; a BOM is skipped)
 * @param options - source label, y-kind, delimiter, decimal separator, point limit
 * @returns a spectrum on ascending wavenumbers (cm⁻¹) with `metadata.format = 'csv'` and any
 *   `# key = value` conditions (path length m, temperature K, pressure kPa, resolution cm⁻¹)
 * @throws BandwrightError `PARSE` (layout, non-numeric cell, column count, mixed delimiters,
 *   undeclared y-kind), `INVALID_VALUE` (NaN, infinities, overflow, λ ≤ 0, transmittance
 *   fraction above 1.5), `NOT_MONOTONIC` (reversal or duplicate x, naming the line), `LIMIT`
 *   (more than `maxPoints` points). Every message names the source and line.
 * @example
 * const spectrum = parseSpectrumTable(new TextEncoder().encode('wavenumber_cm-1,absorbance\n2000,0.1\n2001,0.2\n'),
 *   { source: 'co.csv' });
 * // spectrum.yKind === 'absorbance', spectrum.x = [2000, 2001]
 */
export function parseSpectrumTable(bytes: Uint8Array, options: SpectrumTableOptions): Spectrum {
  return readSpectrumTable(bytes, options, emptyColumns(), false);
}

function readSpectrumTable(
  input: Uint8Array,
  options: SpectrumTableOptions,
  columns: TableColumns,
  reuseOutput: boolean,
): Spectrum {
  const source = options.source;
  const maxPoints = pointLimit(options.maxPoints);
  const bytes = checkedText(input, source);
  const length = bytes.length;
  const preamble = readPreamble(bytes, source);
  const metadata = preamble.metadata;
  const layout = readLayout(bytes, preamble, options);
  const { delimiter, decimal, dataStart } = layout;
  const columnCount = layout.roles.length;

  // First guess at the number of points from the first data line's length; arrays grow if needed.
  let firstEnd = bytes.indexOf(LF, dataStart);
  if (firstEnd < 0) firstEnd = length;
  const estimate = Math.ceil(((length - dataStart) / Math.max(1, firstEnd - dataStart + 1)) * 1.05) + 16;
  const context: RowContext = {
    bytes,
    length,
    source,
    delimiter,
    decimal,
    decimalDetected: layout.decimalDetected,
    skipTabs: delimiter !== TAB,
    quotesRequired: decimal === COMMA && delimiter === COMMA,
    columnCount,
    names: layout.names,
    capacity: Math.min(estimate, maxPoints),
    maxPoints,
    syntax: decimal === COMMA ? DECIMAL_COMMA : DECIMAL_POINT,
    roles: layout.roles.map((role) => (role === 'x' ? 0 : role === 'background' ? 2 : 1)),
  };
  const rows = readRows(context, dataStart, layout.dataLine, columns);
  const { n, xs, ys } = rows;
  const backgrounds = columnCount === 3 ? rows.backgrounds : undefined;
  let direction = rows.direction;
  if (n === 0) throw new BandwrightError('PARSE', `${source}: a header but no data lines`, { file: source });

  // The row buffers are the reader's: a copy, unless the output may be views on them.
  const trim = (array: Float64Array): Float64Array =>
    reuseOutput ? array.subarray(0, n) : array.slice(0, n);
  const x = trim(xs);
  const y = trim(ys);
  const background = backgrounds === undefined ? undefined : trim(backgrounds);
  if (layout.xUnit !== 'cm-1') {
    wavelengthsToWavenumbers(x, layout.xUnit, source);
    direction = -direction;
  }
  if (direction < 0) {
    x.reverse();
    y.reverse();
    background?.reverse();
  }
  if (layout.yKind === 'transmittance') {
    assertTransmittanceFraction(
      y,
      source,
      'name the column transmittance_pct (or %T) or give the y-kind transmittance-percent',
    );
  }
  return makeSpectrum(
    background === undefined
      ? { x, y, yKind: layout.yKind, metadata }
      : { x, y, yKind: layout.yKind, background, metadata },
  );
}
