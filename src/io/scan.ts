/**
 * One entry point for scan files: JCAMP-DX or a spectrum table, chosen by content.
 *
 * Detection: a file whose first non-blank line starts with `##` is JCAMP-DX; otherwise a name
 * ending in `.jdx`, `.dx` or `.jcamp` is read as JCAMP-DX (so its error says what is missing);
 * anything else is a table. `format` overrides both.
 */
import { closeSync, openSync, readSync, statSync } from 'node:fs';
import { BandwrightError } from '../errors.js';
import type { Spectrum, YKind } from '../spectrum/spectrum.js';
import { parseJcamp } from './jcamp.js';
import { resourceLimits } from './limits.js';
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

/** Options of {@link readScan}: those of {@link ParseScanOptions} (source defaults to the path) plus a size limit. */
export interface ReadScanOptions extends Omit<ParseScanOptions, 'source'> {
  /** Label for messages; default the path, or `<stdin>` for `-`. */
  source?: string;
  /** Largest file accepted, bytes; default 200 MB (200·10⁶). */
  maxBytes?: number;
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

function readAll(descriptor: number, label: string, maxBytes: number): Uint8Array {
  const chunks: Buffer[] = [];
  let total = 0;
  const chunk = Buffer.allocUnsafe(1 << 16);
  const pause = new Int32Array(new SharedArrayBuffer(4));
  for (;;) {
    let count: number;
    try {
      count = readSync(descriptor, chunk, 0, chunk.length, null);
    } catch (error) {
      const code = (error as NodeJS.ErrnoException).code;
      if (code === 'EAGAIN') {
        // Non-blocking standard input with nothing yet: wait briefly, synchronously.
        Atomics.wait(pause, 0, 0, 10);
        continue;
      }
      if (code === 'EOF') break;
      throw new BandwrightError(
        'FILE_READ',
        `${label}: cannot read: ${(error as Error).message}`,
        { file: label },
        { cause: error },
      );
    }
    if (count === 0) break;
    total += count;
    if (total > maxBytes)
      throw new BandwrightError(
        'LIMIT',
        `${label}: more than ${maxBytes} bytes, above the limit (BANDWRIGHT_MAX_SCAN_BYTES raises it)`,
        { file: label },
      );
    chunks.push(Buffer.from(chunk.subarray(0, count)));
  }
  return new Uint8Array(Buffer.concat(chunks, total));
}

/**
 * Reads and parses a scan file; `-` reads standard input (synchronously, to its end).
 *
 * @param path - file path as the user gave it, or `-`
 * @param options - y-kind, format, point and byte limits (default 200 MB)
 * @returns the spectrum, `metadata.source` = the path (or `<stdin>`)
 * @throws BandwrightError `FILE_NOT_FOUND` (no such file), `FILE_READ` (a folder, permissions),
 *   `LIMIT` (larger than `maxBytes`), and the parse errors of {@link parseScan}
 * @example
 * const spectrum = readScan('samples/stack-0930.jdx');
 */
export function readScan(path: string, options: ReadScanOptions = {}): Spectrum {
  const maxBytes = options.maxBytes ?? resourceLimits().maxScanBytes;
  if (!(maxBytes > 0))
    throw new BandwrightError('INVALID_VALUE', `maxBytes = ${maxBytes}, must be > 0`, {
      parameter: 'maxBytes',
    });
  const { maxBytes: _maxBytes, source: givenSource, ...parseOptions } = options;
  let bytes: Uint8Array;
  let source: string;
  if (path === '-') {
    source = givenSource ?? STDIN_SOURCE;
    bytes = readAll(0, source, maxBytes);
  } else {
    source = givenSource ?? path;
    let descriptor: number;
    try {
      const stats = statSync(path);
      if (stats.isDirectory())
        throw new BandwrightError('FILE_READ', `${path} is a folder, expected a scan file`, { file: path });
      if (stats.size > maxBytes)
        throw new BandwrightError(
          'LIMIT',
          `${path}: ${stats.size} bytes, above the limit of ${maxBytes} bytes (BANDWRIGHT_MAX_SCAN_BYTES raises it)`,
          { file: path },
        );
      descriptor = openSync(path, 'r');
    } catch (error) {
      if (error instanceof BandwrightError) throw error;
      if ((error as NodeJS.ErrnoException).code === 'ENOENT')
        throw new BandwrightError('FILE_NOT_FOUND', `${path}: no such file`, { file: path });
      throw new BandwrightError(
        'FILE_READ',
        `${path}: cannot read: ${(error as Error).message}`,
        { file: path },
        { cause: error },
      );
    }
    try {
      bytes = readAll(descriptor, path, maxBytes);
    } finally {
      closeSync(descriptor);
    }
  }
  return parseScan(bytes, { ...parseOptions, source });
}
