/**
 * Atomic file output: write to a temporary name in the same folder, flush, then rename into
 * place, so a reader (or a crash) never sees a half-written file.
 */
import { closeSync, existsSync, fsyncSync, openSync, renameSync, unlinkSync, writeSync, mkdirSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { BandwrightError } from '../errors.js';

/** Options for {@link writeFileAtomic}. */
export interface AtomicWriteOptions {
  /** Replace an existing file (default false: refuse with `FILE_EXISTS`). */
  overwrite?: boolean;
  /** Create the folder if it does not exist (default false). */
  createFolder?: boolean;
}

/**
 * Writes a file atomically.
 *
 * @param path - destination path
 * @param content - text (UTF-8) or bytes
 * @param options - overwrite and folder creation
 * @throws BandwrightError `FILE_EXISTS` when the file exists and overwrite is off; `FILE_READ` when
 *   the folder does not exist or is not writable
 */
export function writeFileAtomic(path: string, content: string | Uint8Array, options: AtomicWriteOptions = {}): void {
  if (!options.overwrite && existsSync(path)) {
    throw new BandwrightError('FILE_EXISTS', `${path} exists; use --force to replace it`, { file: path });
  }
  const folder = dirname(path);
  if (options.createFolder) mkdirSync(folder, { recursive: true });
  const temporary = join(folder, `.${basename(path)}.tmp-${process.pid}-${Date.now().toString(36)}`);
  let descriptor: number | undefined;
  try {
    descriptor = openSync(temporary, 'wx');
    const bytes = typeof content === 'string' ? Buffer.from(content, 'utf8') : content;
    let offset = 0;
    while (offset < bytes.length) offset += writeSync(descriptor, bytes, offset, bytes.length - offset);
    fsyncSync(descriptor);
    closeSync(descriptor);
    descriptor = undefined;
    if (!options.overwrite && existsSync(path)) {
      throw new BandwrightError('FILE_EXISTS', `${path} appeared while writing; use --force to replace it`, { file: path });
    }
    renameSync(temporary, path);
  } catch (error) {
    if (descriptor !== undefined) closeSync(descriptor);
    try {
      unlinkSync(temporary);
    } catch {
      // the temporary file may not exist; nothing else to clean up
    }
    if (error instanceof BandwrightError) throw error;
    const reason = error instanceof Error ? error.message : String(error);
    throw new BandwrightError('FILE_READ', `${path}: cannot write: ${reason}`, { file: path }, { cause: error });
  }
}
