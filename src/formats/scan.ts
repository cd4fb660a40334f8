/**
 * One entry point for scan files: JCAMP-DX or a spectrum table, chosen by content.
 *
 * Detection: a file whose first non-blank line starts with `##` is JCAMP-DX; otherwise a name
 * ending in `.jdx`, `.dx` or `.jcamp` is read as JCAMP-DX (so its error says what is missing);
 * anything else is a table. `format` overrides both.
 */
import { BandwrightError } from '../errors.js';
import type { Spectrum, YKind } from '../spectrum/spectrum.js';
import { parseJcamp } from './jcamp/read.js';
import { resourceLimits } from '../resource-limits.js';
import { parseSpectrumTable } from './spectrum-table.js';

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
  let p = bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  while (
    p < bytes.length &&
    (bytes[p] === 0x20 || bytes[p] === 0x09 || bytes[p] === 0x0a || bytes[p] === 0x0d)
  )
    p++;
  if (bytes[p] === 0x23 && bytes[p + 1] === 0x23) return 'jcamp';
  return JCAMP_EXTENSION.test(source) ? 'jcamp' : 'csv';
}

/**
 * Parses a scan from bytes (no file access).
 *
 * @param bytes - the content of a JCAMP-DX file or a spectrum table
 * @param options - source label, y-kind, format, point limit
 * @returns the spectrum on ascending wavenumbers, cm⁻¹
 * @throws BandwrightError from {@link parseJcamp} or {@link parseSpectrumTable}; `PARSE` when a
 *   JCAMP-DX file's y-kind contradicts `yKind`
 * @example
 * const spectrum = parseScan(bytes, { source: 'std-100ppm.jdx' });
 */
export function parseScan(bytes: Uint8Array, options: ParseScanOptions): Spectrum {
  const format = options.format ?? detectScanFormat(bytes, options.source);
  if (options.maxPoints === undefined) options = { ...options, maxPoints: resourceLimits().maxPoints };
  if (format === 'jcamp') {
    const spectrum = parseJcamp(
      bytes,
      options.maxPoints === undefined
        ? { source: options.source }
        : { source: options.source, maxPoints: options.maxPoints },
    );
    if (options.yKind !== undefined && options.yKind !== spectrum.yKind) {
      throw new BandwrightError(
        'PARSE',
        `${options.source}: the JCAMP-DX file declares ${spectrum.yKind} (##YUNITS) but the y-kind option says ${options.yKind}; remove the option or fix the file`,
        { file: options.source, parameter: 'yKind' },
      );
    }
    return spectrum;
  }
  return parseSpectrumTable(bytes, {
    source: options.source,
    ...(options.yKind === undefined ? {} : { yKind: options.yKind }),
    ...(options.defaultYKind === undefined ? {} : { defaultYKind: options.defaultYKind }),
    ...(options.maxPoints === undefined ? {} : { maxPoints: options.maxPoints }),
  });
}
