/**
 * Loading the standards a manifest lists: each scan read and hashed, ready for calibration.
 */
import type { StandardScan } from '../calibration/build.js';
import type { CalibrationInput } from '../calibration/calibration.js';
import type { YKind } from '../spectrum/spectrum.js';
import { BandwrightError } from '../errors.js';
import { sha256OfBytes } from './hash.js';
import type { Manifest } from './manifest.js';
import { resourceLimits } from '../resource-limits.js';
import { parseScan } from '../formats/scan.js';
import { readBytes } from './text-file.js';

/** Standards in memory plus the inputs to record in the calibration. */
export interface LoadedStandards {
  /** Standards in manifest order. */
  standards: StandardScan[];
  /** Each scan with its hash; paths absolute. */
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
    let bytes: Uint8Array;
    try {
      bytes = readBytes(entry.scanPath, {
        maxBytes: resourceLimits().maxScanBytes,
        limitVariable: 'BANDWRIGHT_MAX_SCAN_BYTES',
      });
    } catch (error) {
      if (error instanceof BandwrightError && error.code === 'FILE_NOT_FOUND') {
        throw new BandwrightError(
          'FILE_NOT_FOUND',
          `${manifest.path} line ${entry.line}: standard scan ${entry.scanPath} does not exist`,
          { file: manifest.path, line: entry.line },
        );
      }
      // A folder, an unreadable or an oversized file: say which manifest row named it.
      if (error instanceof BandwrightError)
        throw new BandwrightError(
          error.code,
          `${manifest.path} line ${entry.line}: ${error.message}`,
          { file: manifest.path, line: entry.line },
          { cause: error },
        );
      throw error;
    }
    inputs.push({ role: 'standard', path: entry.scanPath, sha256: sha256OfBytes(bytes) });
    const spectrum = parseScan(bytes, {
      source: entry.scanPath,
      ...(options.yKind === undefined ? {} : { yKind: options.yKind }),
    });
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
