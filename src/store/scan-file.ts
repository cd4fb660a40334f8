/**
 * Reads a scan file (or standard input) and parses it with {@link parseScan}: the file access
 * half of the scan entry point, kept out of `formats/` so parsing stays a pure function of bytes.
 */
import { closeSync, openSync, readSync, statSync } from 'node:fs';
import { BandwrightError } from '../errors.js';
import { fileSystemError } from './file-errors.js';
import { parseScan, STDIN_SOURCE, type ParseScanOptions } from '../formats/scan.js';
import { resourceLimits } from '../resource-limits.js';
import type { Spectrum } from '../spectrum/spectrum.js';

/** Options of {@link readScan}: those of {@link ParseScanOptions} (source defaults to the path) plus a size limit. */
export interface ReadScanOptions extends Omit<ParseScanOptions, 'source'> {
  /** Label for messages; default the path, or `<stdin>` for `-`. */
  source?: string;
  /** Largest file accepted, bytes; default 200 MB (200·10⁶). */
  maxBytes?: number;
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
      throw fileSystemError(error, label);
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
 * Opens a scan file for reading after the checks every reader makes: it exists, it is a file, and
 * it is not larger than the limit (the size is checked before any byte is read).
 *
 * @param path - file path
 * @param maxBytes - largest file accepted, bytes
 * @returns the open descriptor (the caller closes it) and the file's size, bytes
 * @throws BandwrightError `FILE_NOT_FOUND`, `FILE_READ` (a folder, permissions), `LIMIT`
 */
export function openScanFile(path: string, maxBytes: number): { descriptor: number; size: number } {
  try {
    const stats = statSync(path);
    if (stats.isDirectory())
      throw new BandwrightError('FILE_READ', `${path} is a folder, expected a scan file`, { file: path });
    if (stats.size > maxBytes)
      throw new BandwrightError(
        'LIMIT',
        `${path}: ${stats.size} bytes, above the limit of ${maxBytes} bytes ` +
          '(BANDWRIGHT_MAX_SCAN_BYTES raises it)',
        { file: path },
      );
    return { descriptor: openSync(path, 'r'), size: stats.size };
  } catch (error) {
    throw fileSystemError(error, path);
  }
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
    const { descriptor } = openScanFile(path, maxBytes);
    try {
      bytes = readAll(descriptor, path, maxBytes);
    } finally {
      closeSync(descriptor);
    }
  }
  return parseScan(bytes, { ...parseOptions, source });
}
