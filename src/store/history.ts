/**
 * A calibration's check history on disk: where it lives, reading it, appending one record under
 * its lock, and moving an old history aside. The format itself is in `history-format.ts`.
 *
 * Integrity: each record is one line written with a single `write` of the whole line under an
 * exclusive lock file (`<history>.lock`), then flushed to disk, so concurrent rechecks neither lose
 * nor interleave records. A last line without its end of line is a record torn by a crash: it is
 * reported with its line number and content and nothing more is appended until it is repaired.
 */
import { closeSync, existsSync, fsyncSync, openSync, renameSync, writeSync } from 'node:fs';
import { extname } from 'node:path';
import { BandwrightError } from '../errors.js';
import { fileSystemError } from './file-errors.js';
import type { CheckRecord } from '../drift/record.js';
import { writeFileAtomic } from './atomic-write.js';
import {
  formatHistoryHeader,
  formatHistoryRecord,
  parseHistory,
  type History,
  type ReadHistoryOptions,
} from './history-format.js';
import { withFileLock, type LockOptions } from './lock.js';
import { readText } from './text-file.js';

/**
 * The history file of a calibration: beside it, named `<calibration without .json>.history.csv`.
 *
 * @param calibrationPath - calibration file
 * @returns the history path
 * @example
 * historyPathFor('calibrations/lab-co.calibration.json'); // 'calibrations/lab-co.calibration.history.csv'
 */
export function historyPathFor(calibrationPath: string): string {
  const base =
    extname(calibrationPath).toLowerCase() === '.json' ? calibrationPath.slice(0, -5) : calibrationPath;
  return `${base}.history.csv`;
}

/**
 * Reads a history file.
 *
 * @param path - history file
 * @param options - the calibration it must belong to
 * @throws BandwrightError `FILE_NOT_FOUND`, `FILE_READ`, and those of {@link parseHistory}
 * @example
 * const history = readHistory('calibrations/lab-co.calibration.history.csv', {
 *   calibrationSha256: calibration.sha256,
 * });
 */
export function readHistory(path: string, options: ReadHistoryOptions = {}): History {
  return parseHistory(readText(path), path, options);
}

/**
 * Reads a history file, or returns undefined when it does not exist (no check yet).
 *
 * @param path - history file
 * @param options - the calibration it must belong to
 * @throws BandwrightError as {@link readHistory}, except `FILE_NOT_FOUND`
 */
export function readHistoryIfExists(path: string, options: ReadHistoryOptions = {}): History | undefined {
  try {
    return readHistory(path, options);
  } catch (error) {
    if (error instanceof BandwrightError && error.code === 'FILE_NOT_FOUND') return undefined;
    throw error;
  }
}

/** Options of {@link appendHistoryRecord}. */
export interface AppendHistoryOptions {
  /** SHA-256 of the calibration (the history's first line; an existing history must match). */
  calibrationSha256: string;
  /** The calibration's file name (for the first line and messages). */
  calibrationFile?: string;
  /**
   * Makes the record to append from the records already in the history. Called while the lock
   * is held, so it sees every record appended before it.
   */
  complete: (records: readonly CheckRecord[]) => CheckRecord;
  /** Lock timing. */
  lock?: LockOptions;
}

/** What {@link appendHistoryRecord} did. */
export interface AppendedRecord {
  /** The record appended, with its line number. */
  record: CheckRecord;
  /** Whether the history file was created by this append. */
  created: boolean;
  /** Records before this one (file order). */
  previous: CheckRecord[];
}

function appendLine(path: string, line: string): void {
  let descriptor: number | undefined;
  try {
    descriptor = openSync(path, 'a');
    const bytes = Buffer.from(line, 'utf8');
    // One write of the whole line: with O_APPEND the line lands at the end in one piece.
    let offset = writeSync(descriptor, bytes, 0, bytes.length);
    while (offset < bytes.length) offset += writeSync(descriptor, bytes, offset, bytes.length - offset);
    fsyncSync(descriptor);
  } catch (error) {
    throw fileSystemError(error, path, { kind: 'file', action: 'append' });
  } finally {
    if (descriptor !== undefined) closeSync(descriptor);
  }
}

/**
 * Appends one record to a history under its lock file, creating the history (first line and
 * header) when it does not exist.
 *
 * @param path - history file
 * @param options - calibration hash, the function that makes the record, lock timing
 * @returns the record with its line number, whether the file was created, and the earlier records
 * @throws BandwrightError those of {@link readHistory} (a torn or damaged line, another
 *   calibration's history: nothing is appended), `INVALID_VALUE` from {@link formatHistoryRecord},
 *   `FILE_READ` (lock timeout, unwritable folder)
 */
export function appendHistoryRecord(path: string, options: AppendHistoryOptions): AppendedRecord {
  return withFileLock(
    `${path}.lock`,
    () => {
      const readOptions: ReadHistoryOptions = {
        calibrationSha256: options.calibrationSha256,
        ...(options.calibrationFile === undefined ? {} : { calibrationFile: options.calibrationFile }),
      };
      const existing = readHistoryIfExists(path, readOptions);
      const previous = existing?.records ?? [];
      const record = options.complete(previous);
      const line = formatHistoryRecord(record);
      if (existing === undefined) {
        writeFileAtomic(
          path,
          formatHistoryHeader(options.calibrationSha256, options.calibrationFile) + line,
          { overwrite: false },
        );
        return { record: { ...record, line: 3 }, created: true, previous };
      }
      appendLine(path, line);
      return { record: { ...record, line: existing.lines + 1 }, created: false, previous };
    },
    options.lock ?? {},
  );
}

/**
 * Moves an existing history aside (to `<name>.replaced-<time>.csv` beside it), so that a rebuilt
 * calibration starts a new history while the old record is kept.
 *
 * @param path - history file
 * @returns the new name of the old history, or undefined when there was none
 * @throws BandwrightError `FILE_READ` when it cannot be renamed
 */
export function moveHistoryAside(path: string): string | undefined {
  if (!existsSync(path)) return undefined;
  const stamp = new Date().toISOString().replace(/[:.]/g, '-');
  const target = `${path.replace(/\.csv$/i, '')}.replaced-${stamp}.csv`;
  try {
    renameSync(path, target);
  } catch (error) {
    throw new BandwrightError(
      'FILE_READ',
      `${path}: cannot move it aside: ${(error as Error).message}`,
      { file: path },
      { cause: error },
    );
  }
  return target;
}
