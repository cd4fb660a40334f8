/**
 * SHA-256 digests of files and byte buffers, recorded in calibrations so a later run can prove
 * it uses the same inputs (FIPS 180-4, via node:crypto).
 */
import { createHash } from 'node:crypto';
import { closeSync, openSync, readSync, statSync } from 'node:fs';
import { BandwrightError } from '../errors.js';
import { fileSystemError } from './file-errors.js';

/**
 * SHA-256 of bytes.
 *
 * @param bytes - any content
 * @returns the digest as 64 lower-case hexadecimal characters
 * @example
 * sha256OfBytes(new TextEncoder().encode('abc'));
 * // 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'
 */
export function sha256OfBytes(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/**
 * SHA-256 of a file's content, read in 1 MiB chunks (any size).
 *
 * @param path - file path
 * @returns the digest as 64 lower-case hexadecimal characters
 * @throws BandwrightError `FILE_NOT_FOUND` when the path does not exist, `FILE_READ` for a
 *   folder or an unreadable file
 */
export function sha256OfFile(path: string): string {
  let descriptor: number;
  try {
    if (statSync(path).isDirectory())
      throw new BandwrightError('FILE_READ', `${path} is a folder, expected a file`, { file: path });
    descriptor = openSync(path, 'r');
  } catch (error) {
    throw fileSystemError(error, path);
  }
  const hash = createHash('sha256');
  const buffer = Buffer.allocUnsafe(1 << 20);
  try {
    for (;;) {
      const count = readSync(descriptor, buffer, 0, buffer.length, null);
      if (count === 0) break;
      hash.update(buffer.subarray(0, count));
    }
  } catch (error) {
    throw fileSystemError(error, path);
  } finally {
    closeSync(descriptor);
  }
  return hash.digest('hex');
}
