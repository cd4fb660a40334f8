/**
 * Integrity of a calibration and of the files it was built from: the calibration's own hash (its
 * content against its recorded SHA-256) and, for every input it lists, the file on disk now
 * against the SHA-256 recorded when the calibration was built (FIPS 180-4 via node:crypto).
 */
import { dirname, isAbsolute, join } from 'node:path';
import type { Calibration, CalibrationInput } from '../calibration/calibration.js';
import { BandwrightError } from '../errors.js';
import { readCalibration } from './calibration-file.js';
import { sha256OfFile } from './hash.js';

/** What a recorded input file is now. */
export type RecordedInputStatus = 'unchanged' | 'changed' | 'missing' | 'unreadable';

/** One recorded input and the state of its file. */
export interface RecordedInputCheck extends CalibrationInput {
  /** Whether the file still matches its recorded SHA-256. */
  status: RecordedInputStatus;
  /** The path looked at: the recorded path joined to the calibration's folder (absolute paths as recorded). */
  resolvedPath: string;
  /** SHA-256 of the file as it is now, when it could be read and differs. */
  currentSha256?: string;
  /** Why it could not be read, in words. */
  message?: string;
}

/** The outcome of {@link verifyInputs}. */
export interface IntegrityReport {
  /** The calibration file as named. */
  calibration: string;
  /** Its own SHA-256 (verified against its content). */
  sha256: string;
  /** One check per recorded input, in the calibration's order. */
  inputs: RecordedInputCheck[];
  /** True when every input is unchanged. */
  ok: boolean;
}

/**
 * The file a recorded input path names: relative paths are relative to the calibration's folder.
 *
 * @param calibrationPath - the calibration file as named
 * @param recorded - the path recorded in `inputs[]`
 */
export function recordedInputPath(calibrationPath: string, recorded: string): string {
  return isAbsolute(recorded) ? recorded : join(dirname(calibrationPath), recorded);
}

/**
 * Re-hashes every input a calibration lists.
 *
 * @param calibration - a verified calibration
 * @param calibrationPath - its file as named (inputs are relative to its folder)
 * @returns one check per input, in order
 */
export function checkInputs(
  calibration: Pick<Calibration, 'inputs'>,
  calibrationPath: string,
): RecordedInputCheck[] {
  return calibration.inputs.map((input): RecordedInputCheck => {
    const resolvedPath = recordedInputPath(calibrationPath, input.path);
    try {
      const current = sha256OfFile(resolvedPath);
      return current === input.sha256
        ? { ...input, resolvedPath, status: 'unchanged' }
        : { ...input, resolvedPath, status: 'changed', currentSha256: current };
    } catch (error) {
      if (error instanceof BandwrightError && error.code === 'FILE_NOT_FOUND')
        return { ...input, resolvedPath, status: 'missing' };
      if (error instanceof BandwrightError)
        return { ...input, resolvedPath, status: 'unreadable', message: error.message };
      throw error;
    }
  });
}

/**
 * Verifies a calibration file and every input file it lists.
 *
 * @param calibrationPath - the calibration file
 * @returns the calibration's hash and the state of each input
 * @throws BandwrightError `INTEGRITY` when the calibration's own content does not match its
 *   recorded hash; `SCHEMA`, `PARSE`, `FILE_NOT_FOUND` as {@link readCalibration}
 * @example
 * const report = verifyInputs('lab-co.calibration.json');
 * report.inputs.filter((i) => i.status !== 'unchanged'); // what changed since calibrate
 */
export function verifyInputs(calibrationPath: string): IntegrityReport {
  const calibration = readCalibration(calibrationPath);
  const inputs = checkInputs(calibration, calibrationPath);
  return {
    calibration: calibrationPath,
    sha256: calibration.sha256,
    inputs,
    ok: inputs.every((input) => input.status === 'unchanged'),
  };
}
