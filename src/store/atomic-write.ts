/**
 * Atomic file output: write to a temporary name in the same folder, flush, then rename into
 * place, so a reader (or a crash) never sees a half-written file. A temporary left by a process
 * killed outright (SIGKILL, power loss) is never a file anyone needs: the target is either the
 * old or the new one. The next write of the same target removes such leftovers.
 */
import {
  closeSync,
  existsSync,
  fsyncSync,
  openSync,
  readdirSync,
  renameSync,
  statSync,
  unlinkSync,
  writeSync,
  mkdirSync,
} from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { BandwrightError } from '../errors.js';
import { processRuns } from './lock.js';

/**
 * How old a temporary of a process that no longer runs must be before it is removed: an hour,
 * so that a write in progress from another machine sharing the folder (whose process id means
 * nothing here) is never touched; such a write takes milliseconds.
 */
export const LEFT_TEMPORARY_AGE_MS = 3_600_000;

/**
 * Removes the temporaries {@link writeFileAtomic} left beside `path` in processes that were killed
 * outright: named `.<name>.tmp-<pid>-<stamp>`, the process no longer running, and older than
 * {@link LEFT_TEMPORARY_AGE_MS}. Errors are ignored (a leftover is harmless).
 *
 * @param path - the target file whose leftovers are removed
 * @param now - the time, ms since the epoch (default now)
 * @returns the paths removed
 */
export function removeLeftTemporaries(path: string, now: number = Date.now()): string[] {
  const folder = dirname(path);
  const prefix = `.${basename(path)}.tmp-`;
  const removed: string[] = [];
  let names: string[];
  try {
    names = readdirSync(folder);
  } catch {
    return removed;
  }
  for (const name of names) {
    if (!name.startsWith(prefix)) continue;
    const owner = /^(\d+)-[0-9a-z]+$/.exec(name.slice(prefix.length));
    if (owner === null) continue;
    const pid = Number(owner[1]);
    const temporary = join(folder, name);
    try {
      if (
        pid === process.pid ||
        processRuns(pid) ||
        now - statSync(temporary).mtimeMs < LEFT_TEMPORARY_AGE_MS
      )
        continue;
      unlinkSync(temporary);
      removed.push(temporary);
    } catch {
      // gone meanwhile, or not ours to remove: leave it
    }
  }
  return removed;
}

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
export function writeFileAtomic(
  path: string,
  content: string | Uint8Array,
  options: AtomicWriteOptions = {},
): void {
  if (!options.overwrite && existsSync(path)) {
    throw new BandwrightError(
      'FILE_EXISTS',
      (name) => `${path} exists; use ${name('overwrite')} to replace it`,
      {
        file: path,
        parameter: 'overwrite',
      },
    );
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
      throw new BandwrightError(
        'FILE_EXISTS',
        (name) => `${path} appeared while writing; use ${name('overwrite')} to replace it`,
        { file: path, parameter: 'overwrite' },
      );
    }
    renameSync(temporary, path);
    removeLeftTemporaries(path);
  } catch (error) {
    if (descriptor !== undefined) closeSync(descriptor);
    try {
      unlinkSync(temporary);
    } catch {
      // the temporary file may not exist; nothing else to clean up
    }
    if (error instanceof BandwrightError) throw error;
    const reason = error instanceof Error ? error.message : String(error);
    throw new BandwrightError(
      'FILE_READ',
      `${path}: cannot write: ${reason}`,
      { file: path },
      { cause: error },
    );
  }
}
