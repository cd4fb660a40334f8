/**
 * The work done for one scan of a batch, the same in this thread and in a worker thread, so a
 * batch gives identical results either way: read the file, quantify it, and turn a bad scan into
 * a failure entry instead of an exception.
 */
// Direct module imports rather than the public index: a worker thread loads only what it runs.
import type { Calibration } from '../calibration/calibration.js';
import { quantifyScan, type QuantifyOptions } from '../calibration/quantify.js';
import { BandwrightError } from '../errors.js';
import { createScanReader, type ScanReader } from '../io/scan-reader.js';
import type { BatchEntry } from '../report/results.js';
import type { YKind } from '../spectrum/spectrum.js';

/** Everything a batch needs besides the paths; plain data, so it can be sent to a worker. */
export interface BatchSetup {
  /** The verified calibration. */
  calibration: Calibration;
  /** Quantify options (level, conditions, reporting). */
  options: QuantifyOptions;
  /** What y is in scans that do not declare it. */
  yKind?: YKind;
}

/** Quantifies one path at a time with a reader of its own (one per thread). */
export type ScanQuantifier = (path: string) => BatchEntry;

/**
 * Makes the per-scan function of a batch.
 *
 * @param setup - calibration, options, y-kind
 * @returns a function from a scan path to its result, or to a failure entry naming the scan and
 *   the reason when the scan cannot be read or quantified
 * @throws Error (from the returned function) only for faults that are not about the scan (bugs)
 */
export function createScanQuantifier(setup: BatchSetup): ScanQuantifier {
  // Each spectrum is quantified before the next is read, so the readers' buffers can be reused.
  const read: ScanReader = createScanReader({ reuseOutput: true, ...(setup.yKind === undefined ? {} : { yKind: setup.yKind }) });
  return (path: string): BatchEntry => {
    try {
      return quantifyScan(setup.calibration, read(path), setup.options);
    } catch (error) {
      if (error instanceof BandwrightError) return { scan: path, error: error.message };
      throw error;
    }
  };
}
