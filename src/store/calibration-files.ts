/**
 * Finding calibration files: the calibrations in a folder, and `status` targets expanded to
 * calibration files.
 */
import { readdirSync, statSync } from 'node:fs';
import { extname, join } from 'node:path';
import { BandwrightError } from '../errors.js';
import { fileSystemError } from './file-errors.js';
import { parseJson } from './json-file.js';
import { readText } from './text-file.js';

/** A JSON file in a folder that is not a calibration, and why. */
export interface SkippedFile {
  path: string;
  reason: string;
}

/**
 * The calibration files in a folder (not recursive): every `*.json` file whose top level has a
 * `schemaVersion` (other JSON, such as method files, is listed as skipped with the reason). Hidden
 * files are ignored. The calibrations are not verified here; read each with `readCalibration`.
 *
 * @param folder - folder path
 * @returns calibration candidates and skipped JSON files, each sorted by name
 * @throws BandwrightError `FILE_NOT_FOUND`, `FILE_READ` (not a folder)
 */
export function findCalibrationFiles(folder: string): { calibrations: string[]; skipped: SkippedFile[] } {
  let names: string[];
  try {
    if (!statSync(folder).isDirectory())
      throw new BandwrightError('FILE_READ', `${folder} is not a folder`, { file: folder });
    names = readdirSync(folder).sort();
  } catch (error) {
    throw fileSystemError(error, folder, { kind: 'folder', action: 'list' });
  }
  const calibrations: string[] = [];
  const skipped: SkippedFile[] = [];
  for (const name of names) {
    if (name.startsWith('.') || extname(name).toLowerCase() !== '.json') continue;
    const path = join(folder, name);
    try {
      if (!statSync(path).isFile()) continue;
    } catch {
      continue;
    }
    let value: unknown;
    try {
      value = parseJson(readText(path), path);
    } catch (error) {
      // A damaged file that claims to be a calibration by its name is listed, so reading it reports the damage.
      if (name.endsWith('.calibration.json')) calibrations.push(path);
      else skipped.push({ path, reason: error instanceof Error ? error.message : String(error) });
      continue;
    }
    if (typeof value === 'object' && value !== null && !Array.isArray(value) && 'schemaVersion' in value)
      calibrations.push(path);
    else skipped.push({ path, reason: 'not a calibration (no schemaVersion)' });
  }
  return { calibrations, skipped };
}

/** What {@link collectCalibrationFiles} found. */
export interface CollectedCalibrations {
  /** Calibration files (named files as given, then those found in folders), without repeats. */
  calibrations: string[];
  /** JSON files in the folders that are not calibrations. */
  skipped: SkippedFile[];
  /** Folders given that hold no calibration. */
  emptyFolders: string[];
}

/**
 * Expands `status` targets: a folder stands for the calibrations in it ({@link findCalibrationFiles}),
 * anything else is taken as a calibration file (reading it reports a missing or damaged one).
 *
 * @param targets - files and folders
 * @returns calibration files, skipped JSON files, empty folders
 * @throws BandwrightError `FILE_READ` for a folder that cannot be listed
 */
export function collectCalibrationFiles(targets: readonly string[]): CollectedCalibrations {
  const calibrations: string[] = [];
  const skipped: SkippedFile[] = [];
  const emptyFolders: string[] = [];
  for (const target of targets) {
    // A path that cannot be examined is taken as a file: reading it then says what is wrong.
    let folder: boolean;
    try {
      folder = statSync(target).isDirectory();
    } catch {
      folder = false;
    }
    if (!folder) {
      calibrations.push(target);
      continue;
    }
    const found = findCalibrationFiles(target);
    calibrations.push(...found.calibrations);
    skipped.push(...found.skipped);
    if (found.calibrations.length === 0) emptyFolders.push(target);
  }
  return { calibrations: [...new Set(calibrations)], skipped, emptyFolders };
}
