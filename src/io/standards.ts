/**
 * Loading the standards a manifest lists: each scan read (with its background single-beam
 * scan when given) and hashed, ready for `buildBandCalibration`.
 */
import type { StandardScan } from '../calibration/build.js';
import type { CalibrationInput } from '../calibration/calibration.js';
import { makeSpectrum, type YKind } from '../spectrum/spectrum.js';
import { BandwrightError } from '../errors.js';
import { sha256OfBytes } from './hash.js';
import type { Manifest } from './manifest.js';
import { parseScan } from './scan.js';
import { readBytes } from './text-file.js';

/** Largest scan file read, bytes (200 MB). */
export const DEFAULT_MAX_SCAN_BYTES = 200 * 1024 * 1024;

/** Standards in memory plus the inputs to record in the calibration. */
export interface LoadedStandards {
  /** Standards in manifest order. */
  standards: StandardScan[];
  /** Each scan (and background) with its hash; paths absolute. */
  inputs: CalibrationInput[];
}

/**
 * Reads every scan of a manifest.
 *
 * @param manifest - a parsed manifest
 * @param options - `yKind` for scans whose files do not declare one
 * @returns standards and hashed inputs
 * @throws BandwrightError from reading or parsing a scan, with the manifest line added to the message
 */
export function loadStandards(manifest: Manifest, options: { yKind?: YKind } = {}): LoadedStandards {
  const inputs: CalibrationInput[] = [];
  const standards = manifest.entries.map((entry): StandardScan => {
    const where = `${manifest.path} line ${entry.line}`;
    const read = (path: string, role: 'standard' | 'background', kind: YKind | undefined) => {
      let bytes: Uint8Array;
      try {
        bytes = readBytes(path, { maxBytes: DEFAULT_MAX_SCAN_BYTES });
      } catch (error) {
        if (error instanceof BandwrightError && error.code === 'FILE_NOT_FOUND') {
          throw new BandwrightError('FILE_NOT_FOUND', `${where}: ${role} scan ${path} does not exist`, { file: manifest.path, line: entry.line });
        }
        throw error;
      }
      inputs.push({ role, path, sha256: sha256OfBytes(bytes) });
      return parseScan(bytes, { source: path, ...(kind === undefined ? {} : { yKind: kind }) });
    };
    let spectrum = read(entry.scanPath, 'standard', entry.backgroundPath === undefined ? options.yKind : 'single-beam');
    if (entry.backgroundPath !== undefined) {
      const background = read(entry.backgroundPath, 'background', 'single-beam');
      if (background.x.length !== spectrum.x.length || background.x.some((x, i) => x !== spectrum.x[i])) {
        throw new BandwrightError('INVALID_VALUE', `${where}: background ${entry.backgroundPath} is not on the same wavenumber grid as ${entry.scanPath}`, { file: manifest.path, line: entry.line });
      }
      spectrum = makeSpectrum({ x: spectrum.x, y: spectrum.y, yKind: 'single-beam', background: background.y, metadata: spectrum.metadata });
    }
    return {
      scan: entry.scan,
      line: entry.line,
      spectrum,
      concentrations: entry.concentrations,
      conditions: entry.conditions,
      ...(entry.uncertaintyPct === undefined ? {} : { uncertaintyPct: entry.uncertaintyPct }),
      ...(entry.lot === undefined ? {} : { lot: entry.lot }),
    };
  });
  return { standards, inputs };
}
