/**
 * Watching a folder with the quantify engine: each new complete scan (`watch-folder.ts`) is
 * quantified and appended to the result files through the same session as a batch
 * (`quantify-run.ts`), and recorded as processed, one at a time, until a stop is asked — or,
 * once, for the complete scans present (cron). Nothing here prints: events reach the caller
 * through callbacks and the outcome comes back as data.
 */
import { basename, dirname, join } from 'node:path';
import { BandwrightError } from '../errors.js';
import {
  openQuantifySession,
  type QuantifyJob,
  type QuantifyOutputs,
  type QuantifySession,
} from './quantify-run.js';
import type { BatchItem } from './scan-quantifier.js';
import {
  createFolderWatcher,
  openProcessedRecord,
  readProcessedRecord,
  type FileStamp,
  type ProcessedRecordFile,
  type ReadyFile,
} from './watch-folder.js';

/** What happens while watching, for the caller to show. */
export interface WatchEvents {
  /** The folder was read and watching goes on until a stop (not called with `once`). */
  onWatching?: () => void;
  /** A scan was quantified and its result appended (`item.entry` is always there). */
  onScan?: (file: ReadyFile, item: BatchItem) => void;
  /**
   * The folder could not be listed (`problem`: the reason; called once per new reason, and
   * watching goes on), or can be listed again (`problem` undefined).
   */
  onFolder?: (problem: string | undefined) => void;
}

/** What to watch and how. */
export interface WatchRequest {
  /** Calibration, options, y-kind, and the result files (appended to; no output on stdout). */
  job: Omit<QuantifyJob, 'outputs'> & { outputs: Pick<QuantifyOutputs, 'csv' | 'jsonl'> };
  /** The folder scans are written into. */
  folder: string;
  /** A file is complete when unchanged this long, ms. */
  settleMs: number;
  /** Least interval of the periodic look at the folder, ms. */
  pollMs: number;
  /**
   * Record of the files processed (default: `.<results file>.watch-state` beside the first result
   * file; none without a result file).
   */
  state?: string | undefined;
  /** Quantify the complete scans present (waiting for those still settling) and return. */
  once?: boolean;
  /** Ends the watching after the scan in hand. */
  signal?: AbortSignal;
  /** Event callbacks. */
  events?: WatchEvents;
}

/** What a watch did. */
export interface WatchOutcome {
  /** Scans quantified (results and failures). */
  scans: number;
  /** Scans that failed. */
  failed: number;
  /** Wall time, s. */
  seconds: number;
  /** With `once`: files still being written, left for the next run. */
  stillWriting: string[];
}

/**
 * The default record of processed files: `.<name>.watch-state` beside the results file.
 *
 * @param resultsFile - the first result file, if any
 */
export function defaultWatchState(resultsFile: string | undefined): string | undefined {
  return resultsFile === undefined
    ? undefined
    : join(dirname(resultsFile), `.${basename(resultsFile)}.watch-state`);
}

/**
 * Watches a folder, quantifying each new complete scan and appending its result.
 *
 * @param request - job, folder, settle and poll intervals (ms), record, once, stop signal, events
 * @returns counts, time and the files left unfinished (`once`)
 * @throws BandwrightError before any scan is read: the folder cannot be read, a result file
 *   cannot be appended to (another calibration's header, a last line cut short), the record
 *   cannot be read or opened; afterwards only errors writing the results
 */
export async function watchFolder(request: WatchRequest): Promise<WatchOutcome> {
  const { job, folder, settleMs, events = {} } = request;
  const signal = request.signal;
  const statePath = request.state ?? defaultWatchState(job.outputs.csv ?? job.outputs.jsonl);
  const processed = statePath === undefined ? new Map<string, FileStamp>() : readProcessedRecord(statePath);
  const watcher = createFolderWatcher(folder, {
    settleMs,
    pollMs: request.pollMs,
    processed,
    ignore: [job.outputs.csv, job.outputs.jsonl, statePath].filter((p): p is string => p !== undefined),
  });
  let session: QuantifySession;
  let record: ProcessedRecordFile | undefined;
  try {
    session = openQuantifySession({
      ...job,
      outputs: { csv: job.outputs.csv, jsonl: job.outputs.jsonl, mode: 'append', entriesInItems: true },
    });
    try {
      if (statePath !== undefined) record = openProcessedRecord(statePath);
    } catch (error) {
      session.abort();
      throw error;
    }
  } catch (error) {
    watcher.close();
    throw error;
  }

  let wake: (() => void) | undefined;
  const onAbort = (): void => wake?.();
  signal?.addEventListener('abort', onAbort);
  const sleep = (ms: number): Promise<void> =>
    new Promise((resolve) => {
      const done = (): void => {
        clearTimeout(timer);
        wake = undefined;
        resolve();
      };
      const timer = setTimeout(done, ms);
      wake = done;
    });
  const stopped = (): boolean => signal?.aborted === true;

  let folderProblem: string | undefined;
  const look = (): void => {
    let ready;
    try {
      ready = watcher.poll();
      if (folderProblem !== undefined) events.onFolder?.(undefined);
      folderProblem = undefined;
    } catch (error) {
      if (!(error instanceof BandwrightError)) throw error;
      // Said once, and the looking goes on: a network folder may come back.
      if (folderProblem !== error.message) events.onFolder?.(error.message);
      folderProblem = error.message;
      return;
    }
    for (const file of ready) {
      if (stopped()) return;
      const item = session.quantifyPath(file.path);
      record?.add(file.name, file.stamp);
      watcher.markProcessed(file);
      events.onScan?.(file, item);
    }
  };

  const started = performance.now();
  let stillWriting: string[] = [];
  try {
    // The first look fails loudly when the folder cannot be read at all.
    watcher.poll();
    watcher.onChange(() => wake?.());
    look();
    if (request.once) {
      if (watcher.pending().length > 0 && !stopped()) {
        await sleep(settleMs + 1);
        look();
      }
      stillWriting = watcher.pending();
    } else {
      events.onWatching?.();
      while (!stopped()) {
        await sleep(watcher.nextDelayMs());
        if (!stopped()) look();
      }
    }
    session.finish();
  } catch (error) {
    session.abort();
    throw error;
  } finally {
    signal?.removeEventListener('abort', onAbort);
    watcher.close();
    record?.close();
  }
  return {
    scans: session.scans,
    failed: session.failed,
    seconds: (performance.now() - started) / 1000,
    stillWriting,
  };
}
