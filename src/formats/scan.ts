/**
 * One entry point for scan files: JCAMP-DX or a spectrum table, chosen by content.
 *
 * Detection: a file whose first non-blank line starts with `##` is JCAMP-DX; otherwise a name
 * ending in `.jdx`, `.dx` or `.jcamp` is read as JCAMP-DX (so its error says what is missing);
 * anything else is a table. `format` overrides both.
 */
import { BandwrightError } from '../errors.js';
import { resourceLimits } from '../resource-limits.js';
import type { Spectrum, YKind } from '../spectrum/spectrum.js';
import { BYTE, byteOrderMarkLength } from './bytes.js';
import { JcampReader } from './jcamp/read.js';
import { SpectrumTableReader } from './spectrum-table/read.js';

const { CR, HASH, LF, SPACE, TAB } = BYTE;

/** Options of {@link parseScan}. */
export interface ParseScanOptions {
  /** Label for messages and `metadata.source` (the path as given, or `<stdin>`). */
  source: string;
  /** What y is, for tables that do not say; must agree with what a file declares. */
  yKind?: YKind;
  /** What y is when neither the file nor `yKind` says (tables only; used only when given). */
  defaultYKind?: YKind;
  /** Force a format instead of detecting it. */
  format?: 'csv' | 'jcamp';
  /** Most data points accepted; default 2,000,000. */
  maxPoints?: number;
}

/** Name given to standard input in messages and metadata. */
export const STDIN_SOURCE = '<stdin>';

const JCAMP_EXTENSION = /\.(jdx|dx|jcamp)$/i;

/**
 * Which format bytes are in: `jcamp` when the first non-blank line starts with `##`, or when the
 * source name has a JCAMP-DX extension; `csv` otherwise.
 *
 * @param bytes - file content
 * @param source - file name (for the extension)
 */
export function detectScanFormat(bytes: Uint8Array, source: string): 'csv' | 'jcamp' {
  let p = byteOrderMarkLength(bytes);
  while (p < bytes.length && (bytes[p] === SPACE || bytes[p] === TAB || bytes[p] === LF || bytes[p] === CR))
    p++;
  if (bytes[p] === HASH && bytes[p + 1] === HASH) return 'jcamp';
  return JCAMP_EXTENSION.test(source) ? 'jcamp' : 'csv';
}

/** Options of a {@link ScanParser}. */
export interface ScanParserOptions {
  /**
   * Return spectra whose x and y are views on this parser's buffers, which its next parse
   * overwrites (default false: arrays of their own). For a caller that is done with each spectrum
   * before parsing the next, such as a batch.
   */
  reuseOutput?: boolean;
}

/**
 * A scan parser that keeps the readers' buffers from one scan to the next (see
 * {@link JcampReader} and {@link SpectrumTableReader}); it belongs to the caller that made it,
 * and two parsers never share state.
 *
 * @example
 * const parser = new ScanParser({ reuseOutput: true });
 * for (const [source, bytes] of scans) quantify(parser.parse(bytes, { source }));
 */
export class ScanParser {
  readonly #jcamp: JcampReader;
  readonly #table: SpectrumTableReader;

  /** @param options - whether spectra may be views on the parser's buffers */
  constructor(options: ScanParserOptions = {}) {
    this.#jcamp = new JcampReader(options);
    this.#table = new SpectrumTableReader(options);
  }

  /**
   * Parses a scan from bytes, as {@link parseScan} does, with this parser's buffers.
   *
   * @param bytes - the content of a JCAMP-DX file or a spectrum table
   * @param options - source label, y-kind, format, point limit
   * @returns the spectrum on ascending wavenumbers, cm⁻¹; with `reuseOutput`, its arrays are
   *   valid until this parser's next parse
   * @throws BandwrightError as {@link parseScan}
   */
  parse(bytes: Uint8Array, options: ParseScanOptions): Spectrum {
    const format = options.format ?? detectScanFormat(bytes, options.source);
    const maxPoints = options.maxPoints ?? resourceLimits().maxPoints;
    if (format === 'jcamp') {
      const spectrum = this.#jcamp.read(bytes, { source: options.source, maxPoints });
      if (options.yKind !== undefined && options.yKind !== spectrum.yKind) {
        throw new BandwrightError(
          'PARSE',
          `${options.source}: the JCAMP-DX file declares ${spectrum.yKind} (##YUNITS) but the y-kind ` +
            `option says ${options.yKind}; remove the option or fix the file`,
          { file: options.source, parameter: 'yKind' },
        );
      }
      return spectrum;
    }
    return this.#table.read(bytes, {
      source: options.source,
      ...(options.yKind === undefined ? {} : { yKind: options.yKind }),
      ...(options.defaultYKind === undefined ? {} : { defaultYKind: options.defaultYKind }),
      maxPoints,
    });
  }
}

/**
 * Parses a scan from bytes (no file access).
 *
 * @param bytes - the content of a JCAMP-DX file or a spectrum table
 * @param options - source label, y-kind, format, point limit
 * @returns the spectrum on ascending wavenumbers, cm⁻¹
 * @throws BandwrightError from {@link JcampReader.read} or {@link SpectrumTableReader.read};
 *   `PARSE` when a JCAMP-DX file's y-kind contradicts `yKind`
 * @example
 * const spectrum = parseScan(bytes, { source: 'std-100ppm.jdx' });
 */
export function parseScan(bytes: Uint8Array, options: ParseScanOptions): Spectrum {
  return new ScanParser().parse(bytes, options);
}
