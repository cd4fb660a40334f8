/**
 * `bandwright/batch`: the streaming quantify engine the command line uses — many scans in input
 * order (optionally in worker threads) into result files, a table or a JSON document; and a
 * watched folder quantified as scans arrive. Scan arguments (files, folders, globs) and scan lists
 * are expanded here too.
 */
export {
  quantifyScans,
  quantifyGivenResponses,
  openQuantifySession,
  type QuantifyJob,
  type QuantifyOutputs,
  type QuantifySession,
  type QuantifyScansOptions,
  type QuantifyRunOutcome,
} from '../batch/quantify-run.js';
export { watchFolder, type WatchRequest, type WatchEvents, type WatchOutcome } from '../batch/watch-run.js';
export type { TextSink } from '../batch/sinks.js';
export { expandScanArguments, type ExpandScanOptions } from '../batch/scan-paths.js';
export { readScanList, parseScanList } from '../batch/scan-list.js';
export type { BatchItem, BatchSetup, LineFormat, ResultGases } from '../batch/scan-quantifier.js';
export type { FileStamp, ReadyFile } from '../batch/watch-folder.js';
