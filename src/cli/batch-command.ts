/**
 * `quantify` on scans as a streaming batch: outputs opened before the first scan is read (so an
 * existing file is refused up front), entries passed to every output in input order as they come,
 * a progress bar on an interactive terminal, failures reported as they happen, a summary at the
 * end, and a clean stop on Ctrl-C or SIGTERM.
 *
 * Files: `--csv`/`--jsonl` rows stream into `.<name>.partial-<pid>` beside the target and the file
 * is renamed into place when the batch ends, including when it is interrupted by SIGINT/SIGTERM
 * (the scan in hand is finished first; the exit status is then 130 or 143). A second signal, or
 * SIGKILL, ends the process at once: any earlier file of that name is left untouched and the
 * partial file holds the rows written so far.
 */
import {
  reportedGases,
  type BatchEntry,
  type Calibration,
  type QuantifyOptions,
  type YKind,
} from '../index.js';
import {
  jsonDocumentSink,
  openResultFiles,
  resultFiles,
  TABLE_PAGE_SCANS,
  textTableSink,
} from '../batch/sinks.js';
import type { BatchSetup } from '../batch/scan-quantifier.js';
import { MIN_SCANS_FOR_WORKERS, runBatch, workerCount } from '../batch/engine.js';
import { note, raiseStatus, type CommandContext } from './context.js';
import { createProgress } from './progress.js';

/** Exit status after a stop by a signal: 128 + the signal's number (common practice in shells). */
export const SIGNAL_EXIT_STATUS: Readonly<Record<'SIGINT' | 'SIGTERM', number>> = Object.freeze({
  SIGINT: 130,
  SIGTERM: 143,
});

/** What to quantify and where the entries go. */
export interface QuantifyBatchRequest {
  /** The verified calibration. */
  calibration: Calibration;
  /** Its file, as named on the command line (for the JSON document). */
  calibrationPath: string;
  /** Quantify options. */
  options: QuantifyOptions;
  /** What y is in scans that do not declare it. */
  yKind?: YKind;
  /** Scan paths in input order. */
  paths: readonly string[];
  /** Print the `--json` document on stdout (instead of the table). */
  json?: boolean;
  /** Print nothing on stdout. */
  quiet?: boolean;
  /** Results CSV file. */
  csv?: string;
  /** Results JSON-lines file. */
  jsonl?: string;
  /** Replace existing result files. */
  force?: boolean;
  /** Worker threads: `auto` or a count (0 = this thread). */
  workers: 'auto' | number;
  /** Keep every entry in memory and return it (for outputs that need the whole batch, such as a report). */
  keepEntries?: boolean;
}

/** What a batch did. */
export interface QuantifyBatchOutcome {
  /** All entries, when `keepEntries` was asked; otherwise empty. */
  entries: BatchEntry[];
  /** Scans done (results and failures). */
  scans: number;
  /** Scans that failed. */
  failed: number;
  /** The signal that stopped the batch early, if any. */
  interruptedBy?: 'SIGINT' | 'SIGTERM';
  /** Wall time, s. */
  seconds: number;
}

/**
 * Runs a quantify batch for the command line and sets the exit status (1 when a scan failed,
 * 130/143 when stopped by SIGINT/SIGTERM).
 *
 * @param context - output streams and status
 * @param request - calibration, options, paths, outputs, workers
 * @returns counts, time and (if asked) the entries
 * @throws BandwrightError `FILE_EXISTS` and other output errors before any scan is read; errors
 *   writing results (the partial files are removed); faults that are not about a scan
 */
export async function runQuantifyBatch(
  context: CommandContext,
  request: QuantifyBatchRequest,
): Promise<QuantifyBatchOutcome> {
  const { calibration, options } = request;
  const level = options.level ?? 0.95;
  const gases = reportedGases(calibration).map((g) => ({ gas: g.gas, unit: options.unit ?? g.unit }));
  const files = resultFiles(request, gases, calibration.sha256);
  const { sinks, lineFormats } = openResultFiles(files, {
    mode: 'replace',
    overwrite: request.force === true,
  });
  if (request.json)
    sinks.push(
      jsonDocumentSink(context.stdout, { file: request.calibrationPath, sha256: calibration.sha256 }, level),
    );
  else if (!request.quiet) sinks.push(textTableSink(context.stdout, level));
  // Whole entries travel only when an output needs more than its lines.
  const keepEntries = request.json || !request.quiet || request.keepEntries === true;

  const total = request.paths.length;
  const progress = createProgress(context, { total });
  const entries: BatchEntry[] = [];
  let done = 0;
  let failed = 0;
  let interruptedBy: 'SIGINT' | 'SIGTERM' | undefined;
  const onSignal = (signal: 'SIGINT' | 'SIGTERM'): void => {
    if (interruptedBy !== undefined) {
      // A second signal: stop at once, as without a handler (partial files stay behind).
      removeHandlers();
      process.kill(process.pid, signal);
      return;
    }
    interruptedBy = signal;
    progress.note(
      `bandwright: ${signal}: finishing the scans in hand, then writing the results (a second ${signal} stops at once)`,
    );
  };
  const onInterrupt = (): void => onSignal('SIGINT');
  const onTerminate = (): void => onSignal('SIGTERM');
  const removeHandlers = (): void => {
    process.off('SIGINT', onInterrupt);
    process.off('SIGTERM', onTerminate);
  };
  // Reading standard input blocks this thread, so a handler could not run: Ctrl-C keeps its
  // usual meaning there.
  const handleSignals = !request.paths.includes('-');
  if (handleSignals) {
    process.on('SIGINT', onInterrupt);
    process.on('SIGTERM', onTerminate);
  }

  const setup: BatchSetup = {
    calibration,
    options,
    lineFormats,
    keepEntries,
    ...(request.yKind === undefined ? {} : { yKind: request.yKind }),
  };
  const started = performance.now();
  const workers = workerCount(request.workers, total, request.paths.includes('-'));
  try {
    const outcome = await runBatch(setup, request.paths, {
      workers,
      shouldStop: () => interruptedBy !== undefined,
      onItem: (item) => {
        for (const sink of sinks) sink.add(item);
        if (request.keepEntries && item.entry !== undefined) entries.push(item.entry);
        done++;
        if (item.error !== undefined) {
          failed++;
          progress.note(`bandwright: ${item.error}`);
        }
        progress.update(done, failed);
      },
    });
    if (outcome.workersOutOfMemory > 0)
      progress.note(
        `bandwright: ${outcome.workersOutOfMemory} worker thread(s) ran out of heap; their scans were quantified in the main thread`,
      );
    progress.finish();
    for (const sink of sinks) sink.finish();
  } catch (error) {
    progress.finish();
    for (const sink of sinks) sink.abort();
    throw error;
  } finally {
    removeHandlers();
  }
  const seconds = (performance.now() - started) / 1000;
  for (const sink of sinks) if (sink.doneMessage !== undefined) note(context, sink.doneMessage);
  if (failed > 0) {
    note(context, `${failed} of ${done} scan(s) could not be quantified`);
    raiseStatus(context, 1);
  }
  const rate = seconds > 0 ? done / seconds : Number.POSITIVE_INFINITY;
  note(
    context,
    `${done} scan(s), ${failed} failed, in ${seconds.toFixed(2)} s (${Number.isFinite(rate) ? rate.toFixed(0) : '—'} scans/s${workers > 0 ? `, ${workers} worker threads` : ''})`,
  );
  if (interruptedBy !== undefined) {
    note(
      context,
      `bandwright: interrupted by ${interruptedBy} after ${done} of ${total} scans; the results of those ${done} are complete`,
    );
    raiseStatus(context, SIGNAL_EXIT_STATUS[interruptedBy]);
  }
  return { entries, scans: done, failed, seconds, ...(interruptedBy === undefined ? {} : { interruptedBy }) };
}

/** Help text of `quantify` about long batches and how result files are written. */
export const QUANTIFY_BATCH_HELP = `
Batches:
  Scans come from the arguments (files, folders, globs, - for stdin) and from --from <list>
  (one path per line; relative paths are relative to the current folder; # comments).
  A scan that cannot be read or quantified gets an error row (scan, reason) and the batch
  goes on; the exit status is then 1. Results go to --csv and/or --jsonl as they come; the
  table on stdout is printed in pages of ${TABLE_PAGE_SCANS} scans, the --json document streamed whole;
  --quiet prints nothing on stdout. With --report or --plot the whole batch is kept in memory
  for the report and quantified in this thread.
  On an interactive terminal a progress bar is drawn on stderr; a summary (scans, failures,
  time, scans/s) ends every batch. Worker threads (--workers auto: one per idle core when two
  or more are idle, for batches of ${MIN_SCANS_FOR_WORKERS} scans or more) read and quantify while the
  main thread writes; the results are the same, in the same order, as with --workers 0.

Result files (--csv, --jsonl):
  Rows stream into .<name>.partial-<pid> beside the file, which is renamed into place when the
  batch ends, so the file is either the complete new one or the previous one. An existing file
  is replaced only with --force. Ctrl-C or SIGTERM: the scans in hand are finished, the file is
  renamed into place with every finished row, and the exit status is 130 (SIGINT) or 143
  (SIGTERM). A second signal or SIGKILL stops at once: an earlier file is left as it was and
  the .partial file holds the rows written so far.
`;
