/**
 * One wording for file-system failures, so every reader says the same thing for the same fault:
 * a missing path is `FILE_NOT_FOUND`, anything else the system refuses is `FILE_READ` with the
 * system's own reason.
 */
import { BandwrightError } from '../errors.js';

/** What was being done when the file system refused. */
export interface FileAccess {
  /** Whether the path was expected to be a file or a folder (for "no such …"). */
  kind: 'file' | 'folder';
  /** The verb for the message: "cannot read", "cannot list", "cannot append" … */
  action: 'read' | 'list' | 'append' | 'write';
}

/**
 * Turns an error thrown by a `node:fs` call into a `BandwrightError` naming the path. A
 * `BandwrightError` (thrown by the caller's own checks inside the same `try`) passes through.
 *
 * @param error - what the `fs` call threw
 * @param path - the path it was given
 * @param access - file or folder, and what was being done
 * @returns the error to throw
 */
export function fileSystemError(
  error: unknown,
  path: string,
  access: FileAccess = { kind: 'file', action: 'read' },
): BandwrightError {
  if (error instanceof BandwrightError) return error;
  if ((error as NodeJS.ErrnoException).code === 'ENOENT')
    return new BandwrightError('FILE_NOT_FOUND', `${path}: no such ${access.kind}`, { file: path });
  return new BandwrightError(
    'FILE_READ',
    `${path}: cannot ${access.action}: ${(error as Error).message}`,
    { file: path },
    { cause: error },
  );
}
