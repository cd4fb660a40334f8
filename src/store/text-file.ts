/**
 * Reading whole text and byte files with errors that name the file.
 */
import { readFileSync, statSync } from 'node:fs';
import { BandwrightError } from '../errors.js';
import { fileSystemError } from './file-errors.js';
import { resourceLimits } from '../resource-limits.js';

/**
 * Reads a file as bytes.
 *
 * @param path - file path
 * @param options - `maxBytes`: refuse larger files (default 64 MiB, or BANDWRIGHT_MAX_TABLE_BYTES);
 *   `limitVariable`: the environment variable named in the message (default BANDWRIGHT_MAX_TABLE_BYTES)
 * @throws BandwrightError `FILE_NOT_FOUND`, `FILE_READ` (folder, permissions), `LIMIT` (too large);
 *   `USAGE` for a bad limit variable
 */
export function readBytes(
  path: string,
  options: { maxBytes?: number; limitVariable?: string } = {},
): Uint8Array {
  const maxBytes = options.maxBytes ?? resourceLimits().maxTableBytes;
  let size: number;
  try {
    const stats = statSync(path);
    if (stats.isDirectory())
      throw new BandwrightError('FILE_READ', `${path} is a folder, expected a file`, { file: path });
    size = stats.size;
  } catch (error) {
    throw fileSystemError(error, path);
  }
  if (size > maxBytes) {
    const howToRaise =
      options.limitVariable === undefined && options.maxBytes !== undefined
        ? ''
        : ` (${options.limitVariable ?? 'BANDWRIGHT_MAX_TABLE_BYTES'} raises it)`;
    throw new BandwrightError(
      'LIMIT',
      `${path}: ${size} bytes, above the limit of ${maxBytes} bytes${howToRaise}`,
      { file: path },
    );
  }
  try {
    return readFileSync(path);
  } catch (error) {
    throw fileSystemError(error, path);
  }
}

/**
 * Reads a UTF-8 text file; a UTF-8 byte-order mark is dropped, UTF-16 is refused with a message.
 *
 * @param path - file path
 * @param options - `maxBytes` (default 64 MiB)
 * @throws BandwrightError as {@link readBytes}, and `PARSE` for UTF-16 or invalid UTF-8
 */
export function readText(path: string, options: { maxBytes?: number } = {}): string {
  return decodeText(readBytes(path, options), path);
}

/**
 * Decodes UTF-8 bytes, dropping a byte-order mark.
 *
 * @param bytes - file content
 * @param source - file name for messages
 * @throws BandwrightError `PARSE` for UTF-16 byte-order marks, NUL bytes or invalid UTF-8
 */
export function decodeText(bytes: Uint8Array, source: string): string {
  if (
    bytes.length >= 2 &&
    ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff))
  ) {
    throw new BandwrightError('PARSE', `${source}: the file is UTF-16; save it as UTF-8`, { file: source });
  }
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw new BandwrightError('PARSE', `${source}: not valid UTF-8 text (a binary file?)`, { file: source });
  }
  if (text.includes('\u0000'))
    throw new BandwrightError('PARSE', `${source}: contains NUL bytes (a binary file?), expected text`, {
      file: source,
    });
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}
