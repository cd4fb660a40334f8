/**
 * Scan reading for long batches: the same checks, messages and parsers as {@link readScan}, but
 * every file is read into one buffer that is reused (grown when a larger file comes), so a batch of
 * tens of thousands of scans allocates no file-sized buffers and copies each file's bytes once.
 * The parsed spectrum never refers to that buffer (the readers copy what they keep); with
 * `reuseOutput` its x and y are views on the buffers of this reader's own {@link ScanParser},
 * valid until its next read, which saves an allocation and a copy per column of every scan.
 */
import { closeSync, readSync } from 'node:fs';
import { BandwrightError } from '../errors.js';
import { fileSystemError } from '../store/file-errors.js';
import type { Spectrum } from '../spectrum/spectrum.js';
import { resourceLimits } from '../resource-limits.js';
import { ScanParser } from '../formats/scan.js';
import { openScanFile, readScan, type ReadScanOptions } from '../store/scan-file.js';

/** Reads one scan; see {@link createScanReader}. */
export type ScanReader = (path: string) => Spectrum;

/** Options of {@link createScanReader}. */
export interface ScanReaderOptions extends Omit<ReadScanOptions, 'source'> {
  /**
   * Return spectra whose x and y are views on buffers the next read by this reader overwrites
   * (default false). For a caller that is done with each spectrum before reading the next.
   */
  reuseOutput?: boolean;
}

/**
 * Makes a scan reader with its own reusable buffer (one per thread).
 *
 * @param options - y-kind, format, point and byte limits, as for {@link readScan} (`source` is
 *   ignored: each spectrum's source is the path it was read from)
 * @returns a function reading a path (or `-` for standard input) into a spectrum
 * @throws BandwrightError (from the returned function) as {@link readScan}: `FILE_NOT_FOUND`,
 *   `FILE_READ`, `LIMIT`, and the parse errors
 * @example
 * const read = createScanReader({ yKind: 'absorbance' });
 * for (const path of paths) quantifyScan(calibration, read(path));
 */
export function createScanReader(options: ScanReaderOptions = {}): ScanReader {
  // The limits are read once, not per scan (BANDWRIGHT_MAX_SCAN_BYTES, BANDWRIGHT_MAX_POINTS).
  const limits = resourceLimits();
  const { maxBytes: givenMaxBytes, reuseOutput: givenReuseOutput, ...rest } = options;
  const maxBytes = givenMaxBytes ?? limits.maxScanBytes;
  if (!(maxBytes > 0))
    throw new BandwrightError('INVALID_VALUE', `maxBytes = ${maxBytes}, must be > 0`, {
      parameter: 'maxBytes',
    });
  const parseOptions = { ...rest, maxPoints: options.maxPoints ?? limits.maxPoints };
  const parser = new ScanParser({ reuseOutput: givenReuseOutput === true });
  let buffer = Buffer.allocUnsafe(1 << 20);
  return (path: string): Spectrum => {
    if (path === '-') return readScan(path, { ...parseOptions, maxBytes });
    const { descriptor, size } = openScanFile(path, maxBytes);
    let length = 0;
    try {
      // One spare byte shows whether the file grew after the stat; keep reading to its end.
      if (buffer.length < size + 1) buffer = Buffer.allocUnsafe(Math.max(size + 1, buffer.length * 2));
      for (;;) {
        if (length === buffer.length) {
          const bigger = Buffer.allocUnsafe(buffer.length * 2);
          buffer.copy(bigger, 0, 0, length);
          buffer = bigger;
        }
        const count = readSync(descriptor, buffer, length, buffer.length - length, null);
        if (count === 0) break;
        length += count;
        if (length > maxBytes)
          throw new BandwrightError(
            'LIMIT',
            `${path}: more than ${maxBytes} bytes, above the limit (BANDWRIGHT_MAX_SCAN_BYTES raises it)`,
            { file: path },
          );
      }
    } catch (error) {
      throw fileSystemError(error, path);
    } finally {
      closeSync(descriptor);
    }
    const { yKind, defaultYKind, format, maxPoints } = parseOptions;
    return parser.parse(buffer.subarray(0, length), { source: path, yKind, defaultYKind, format, maxPoints });
  };
}
