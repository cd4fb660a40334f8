/**
 * Calibration files: written once, atomically, never overwritten without `force`; read back
 * with the schema and the content hash verified.
 */
import { verifyCalibration, type Calibration } from '../calibration/calibration.js';
import { parseMethod, type Method } from '../calibration/method.js';
import { writeFileAtomic } from './atomic-write.js';
import { readJson } from './json-file.js';

/**
 * Reads a calibration and verifies it.
 *
 * @param path - calibration file
 * @returns the calibration
 * @throws BandwrightError `FILE_NOT_FOUND`, `PARSE`, `SCHEMA` (newer schema, missing fields), `INTEGRITY` (tampered)
 */
export function readCalibration(path: string): Calibration {
  return verifyCalibration(readJson(path), path);
}

/**
 * Writes a calibration atomically.
 *
 * @param path - destination
 * @param calibration - a sealed calibration
 * @param options - `force` to replace an existing file
 * @throws BandwrightError `FILE_EXISTS` without force; `FILE_READ` when the folder is not writable
 */
export function writeCalibration(
  path: string,
  calibration: Calibration,
  options: { force?: boolean } = {},
): void {
  writeFileAtomic(path, `${JSON.stringify(calibration, null, 2)}\n`, {
    overwrite: options.force === true,
    createFolder: true,
  });
}

/**
 * Reads and validates a method file (JSON, at most 1 MiB, nesting at most 32 levels).
 *
 * @param path - method file
 * @throws BandwrightError `FILE_NOT_FOUND`, `PARSE`, `LIMIT`, and the validation errors of {@link parseMethod}
 */
export function readMethod(path: string): Method {
  return parseMethod(readJson(path, { maxBytes: 1024 * 1024, maxDepth: 32 }), path);
}
