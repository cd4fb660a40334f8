/**
 * The shapes of the JSON the command-line program writes, built from the product's own types, so
 * that tests read its output with type checks; and narrowing of a batch entry to a result or a
 * failure, failing the test (and showing the entry) when it is the other.
 *
 * The quantify, recheck and status documents are the product's own declared types (src/report
 * results.ts and drift-text.ts), re-exported here; inspect's is assembled in src/cli/inspect.ts and
 * follows it.
 */
import { expect } from 'vitest';
export type { QuantifyDocument } from '../../src/report/results.js';
export type { RecheckDocument, StatusDocument, StatusEntry } from '../../src/report/drift-text.js';
import type { BatchEntry, ScanFailure } from '../../src/report/results.js';
import { isFailure } from '../../src/report/results.js';
import type { GasResult, ScanResult } from '../../src/calibration/result.js';
import type { ScanDescription } from '../../src/report/inspect.js';
import type { FileStamp } from '../../src/batch/watch-folder.js';

/** One line of `--jsonl` (quantify, watch): a results element with the calibration's hash. */
export type ResultLine = BatchEntry & { calibrationSha256: string };

/** The `inspect --json` document (src/cli/inspect.ts). */
export interface InspectDocument {
  scans: ScanDescription[];
  failures: { scan: string; error: string }[];
}

/** One line of a watched folder's record of processed files (src/batch/watch-folder.ts). */
export type WatchStateLine = { name: string } & FileStamp;

/**
 * The entry as a scan result; the test fails, showing the entry, when it is a failure or missing.
 *
 * @param entry - a batch entry
 */
export function scanResult(entry: BatchEntry | undefined): ScanResult {
  if (entry === undefined || isFailure(entry))
    expect.fail(`expected a scan result, got ${JSON.stringify(entry)}`);
  return entry;
}

/**
 * The entry as a failure; the test fails, showing the entry, when it is a result or missing.
 *
 * @param entry - a batch entry
 */
export function scanFailure(entry: BatchEntry | undefined): ScanFailure {
  if (entry === undefined || !isFailure(entry))
    expect.fail(`expected a failed scan, got ${JSON.stringify(entry)}`);
  return entry;
}

/**
 * One gas of a scan result; the test fails when the entry is a failure or has no gas there.
 *
 * @param entry - a batch entry
 * @param index - position of the gas in the result (calibration order)
 */
export function gasAt(entry: BatchEntry | undefined, index = 0): GasResult {
  const gas = scanResult(entry).gases[index];
  if (gas === undefined) expect.fail(`expected a gas at position ${index}, got ${JSON.stringify(entry)}`);
  return gas;
}
