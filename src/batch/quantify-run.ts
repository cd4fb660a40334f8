/**
 * The one streaming quantify engine. A quantify session owns the outputs of a run — result files
 * (`--csv`, `--jsonl`), the `--json` document or the results table on standard output — and
 * passes every scan's item to each of them in input order as it comes; it keeps the entries and
 * spectra only when a report or plots need them. {@link quantifyScans} runs a list of scan paths
 * through a session (in this thread or in worker threads, `engine.ts`), `quantifyGivenResponses`
 * the responses given instead of scans, and `watch-run.ts` the scans arriving in a folder.
 * `quantify`, `watch`, the demo (which runs those commands) and the bench all go through here.
 *
 * Nothing here prints to the user or decides an exit status: outcomes come back as data, and
 * progress and failures reach the caller through callbacks.
 */
import { reportedGases, type Calibration } from '../calibration/calibration.js';
import { quantifyResponses, type QuantifyOptions } from '../calibration/quantify.js';
import type { ParameterNames } from '../errors.js';
import type { SampleSpectrum } from '../report/html-quantify.js';
import type { BatchEntry } from '../report/results.js';
import type { YKind } from '../spectrum/spectrum.js';
import { runBatch, workerCount } from './engine.js';
import {
  batchItem,
  createScanQuantifier,
  type BatchItem,
  type BatchSetup,
  type ScanQuantifier,
} from './scan-quantifier.js';
import {
  jsonDocumentSink,
  openResultFiles,
  resultFiles,
  textTableSink,
  type EntrySink,
  type TextSink,
} from './sinks.js';

/** Where the results of a quantify run go, and what the run keeps. */
export interface QuantifyOutputs {
  /** Results CSV file. */
  csv?: string | undefined;
  /** Results JSON-lines file. */
  jsonl?: string | undefined;
  /**
   * `replace`: each file streams into a temporary file renamed into place at the end (quantify);
   * `append`: rows are appended to the file itself (watch).
   */
  mode: 'replace' | 'append';
  /** Replace existing result files (`replace` mode; default false: refuse them up front). */
  overwrite?: boolean;
  /** Standard output: the `--json` document or the results table, or nothing. */
  stdout?: { sink: TextSink; form: 'json' | 'table' };
  /** Keep every entry and return them (for a report). */
  collectEntries?: boolean;
  /** Keep every spectrum read and return them (for a report or plots; runs in this thread). */
  collectSpectra?: boolean;
  /** Items handed to callbacks carry their entries even when no output needs them. */
  entriesInItems?: boolean;
}

/** What to quantify with and where the results go. */
export interface QuantifyJob {
  /** The verified calibration. */
  calibration: Calibration;
  /** Its file as named (for the `--json` document). */
  calibrationPath: string;
  /** Quantify options (level, conditions, reporting). */
  options: QuantifyOptions;
  /** What y is in scans that do not declare it. */
  yKind?: YKind | undefined;
  /** Outputs and what to keep. */
  outputs: QuantifyOutputs;
  /** The caller's names for the core's parameters, in the reasons of failed scans (default the core's). */
  parameterNames?: ParameterNames | undefined;
}

/** The open outputs of a quantify run, taking items one at a time. */
export interface QuantifySession {
  /** The batch setup (line formats and what items carry), as sent to worker threads. */
  readonly setup: BatchSetup;
  /**
   * Quantifies one scan in this thread and delivers its item.
   *
   * @param path - scan path, or `-` for standard input
   * @returns the item delivered
   */
  quantifyPath(path: string): BatchItem;
  /** Passes the next item (input order) to every output and counts it. */
  deliver(item: BatchItem): void;
  /** Items delivered. */
  readonly scans: number;
  /** Items delivered that are failures. */
  readonly failed: number;
  /** Entries kept (`collectEntries`), in input order. */
  readonly entries: BatchEntry[];
  /** Spectra kept (`collectSpectra`), in input order; a scan that could not be read has none. */
  readonly spectra: SampleSpectrum[];
  /**
   * Completes every output (closing text, rename into place).
   *
   * @returns the result files written
   * @throws BandwrightError when a result file cannot be completed (the outputs are abandoned)
   */
  finish(): string[];
  /** Gives up: removes temporary files, closes the document on standard output. */
  abort(): void;
}

/** The gases of a calibration as result columns, in the unit the results are reported in. */
export function resultGases(
  calibration: Calibration,
  options: QuantifyOptions,
): { gas: string; unit: string }[] {
  return reportedGases(calibration).map((g) => ({ gas: g.gas, unit: options.unit ?? g.unit }));
}

/**
 * Opens the outputs of a quantify run: the result files first (so an existing file is refused,
 * or a file of another calibration is refused for appending, before any scan is read), then the
 * output on standard output.
 *
 * @param job - calibration, options, y-kind, outputs
 * @returns the session
 * @throws BandwrightError `FILE_EXISTS` (replace mode without overwrite), the refusals of
 *   `assertAppendable` (append mode), `FILE_READ` when a file cannot be created
 */
export function openQuantifySession(job: QuantifyJob): QuantifySession {
  const { calibration, options, outputs } = job;
  const level = options.level ?? 0.95;
  const files = resultFiles(outputs, resultGases(calibration, options), calibration.sha256);
  const opened = openResultFiles(files, {
    mode: outputs.mode,
    overwrite: outputs.overwrite === true,
  });
  const sinks: EntrySink[] = opened.sinks;
  if (outputs.stdout?.form === 'json')
    sinks.push(
      jsonDocumentSink(outputs.stdout.sink, { file: job.calibrationPath, sha256: calibration.sha256 }, level),
    );
  else if (outputs.stdout?.form === 'table') sinks.push(textTableSink(outputs.stdout.sink, level));
  const collectEntries = outputs.collectEntries === true;
  const collectSpectra = outputs.collectSpectra === true;
  const setup: BatchSetup = {
    calibration,
    options,
    lineFormats: opened.lineFormats,
    // Whole entries travel only when an output or the caller needs more than the lines.
    keepEntries: outputs.stdout !== undefined || collectEntries || outputs.entriesInItems === true,
    keepSpectra: collectSpectra,
    ...(job.yKind === undefined ? {} : { yKind: job.yKind }),
    ...(job.parameterNames === undefined ? {} : { parameterNames: job.parameterNames }),
  };
  const entries: BatchEntry[] = [];
  const spectra: SampleSpectrum[] = [];
  let quantifier: ScanQuantifier | undefined;
  let scans = 0;
  let failed = 0;
  const deliver = (item: BatchItem): void => {
    for (const sink of sinks) sink.add(item);
    if (collectEntries && item.entry !== undefined) entries.push(item.entry);
    if (collectSpectra && item.sample !== undefined) spectra.push(item.sample);
    scans++;
    if (item.error !== undefined) failed++;
  };
  const abort = (): void => {
    for (const sink of sinks) sink.abort();
  };
  return {
    setup,
    quantifyPath(path) {
      quantifier ??= createScanQuantifier(setup);
      const item = quantifier(path);
      deliver(item);
      return item;
    },
    deliver,
    get scans() {
      return scans;
    },
    get failed() {
      return failed;
    },
    entries,
    spectra,
    finish() {
      try {
        for (const sink of sinks) sink.finish();
      } catch (error) {
        abort();
        throw error;
      }
      return sinks.flatMap((sink) => (sink.file === undefined ? [] : [sink.file]));
    },
    abort,
  };
}

/** What a quantify run did. */
export interface QuantifyRunOutcome {
  /** Scans done (results and failures). */
  scans: number;
  /** Scans that failed. */
  failed: number;
  /** Scans asked for. */
  total: number;
  /** Wall time of the quantification and the completion of the outputs, s. */
  seconds: number;
  /** Worker threads used (0: this thread). */
  workers: number;
  /** Whether the run stopped before its last scan. */
  stopped: boolean;
  /** Worker threads that ran out of heap (their scans were quantified in this thread). */
  workersOutOfMemory: number;
  /** The result files written. */
  files: string[];
  /** Every entry, when `collectEntries` was asked; otherwise empty. */
  entries: BatchEntry[];
  /** Every spectrum read, when `collectSpectra` was asked; otherwise empty. */
  spectra: SampleSpectrum[];
}

/** Completes the outputs of a run and makes its outcome. */
function completeRun(
  session: QuantifySession,
  started: number,
  run: Pick<QuantifyRunOutcome, 'total' | 'workers' | 'stopped' | 'workersOutOfMemory'>,
): QuantifyRunOutcome {
  const files = session.finish();
  return {
    ...run,
    scans: session.scans,
    failed: session.failed,
    seconds: (performance.now() - started) / 1000,
    files,
    entries: session.entries,
    spectra: session.spectra,
  };
}

/** Options of {@link quantifyScans}. */
export interface QuantifyScansOptions {
  /** Worker threads: `auto` or a count (0: this thread); see `workerCount`. */
  workers: 'auto' | number;
  /**
   * Stops the run: no new scan is started, the scans in hand are finished and delivered, and the
   * outputs are completed with every finished scan.
   */
  signal?: AbortSignal;
  /** Receives every item in input order, after the outputs, with the counts so far. */
  onItem?: (item: BatchItem, counts: { done: number; failed: number }) => void;
  /** Called once the last item is delivered, before the outputs are completed. */
  beforeFinish?: () => void;
}

/**
 * Quantifies scan paths, streaming every item to the outputs in input order.
 *
 * @param job - calibration, options, y-kind, outputs
 * @param paths - scan paths in input order (`-` for standard input keeps the run in this thread)
 * @param options - workers, stop signal, item callback
 * @returns counts, time, workers, files written and (if asked) the entries and spectra
 * @throws BandwrightError from opening the outputs, before any scan is read; errors completing
 *   the result files (temporary files are removed); faults that are not about a scan
 */
export async function quantifyScans(
  job: QuantifyJob,
  paths: readonly string[],
  options: QuantifyScansOptions,
): Promise<QuantifyRunOutcome> {
  const session = openQuantifySession(job);
  const workers = job.outputs.collectSpectra
    ? 0
    : workerCount(options.workers, paths.length, paths.includes('-'));
  const signal = options.signal;
  const started = performance.now();
  let batch;
  try {
    batch = await runBatch(session.setup, paths, {
      workers,
      shouldStop: () => signal?.aborted === true,
      onItem: (item) => {
        session.deliver(item);
        options.onItem?.(item, { done: session.scans, failed: session.failed });
      },
    });
    options.beforeFinish?.();
  } catch (error) {
    session.abort();
    throw error;
  }
  return completeRun(session, started, {
    total: paths.length,
    workers,
    stopped: batch.stopped,
    workersOutOfMemory: batch.workersOutOfMemory,
  });
}

/**
 * Quantifies responses given at reference conditions (replicates of one sample) instead of
 * scans, and writes the one entry to the outputs as a scan's would be written.
 *
 * @param job - calibration, options, outputs
 * @param responses - the responses, in the calibration's response unit
 * @returns the outcome of a one-entry run
 * @throws BandwrightError from `quantifyResponses` (before any output is opened) and from
 *   opening or completing the outputs
 */
export function quantifyGivenResponses(job: QuantifyJob, responses: readonly number[]): QuantifyRunOutcome {
  const entry = quantifyResponses(job.calibration, responses, job.options);
  const started = performance.now();
  const session = openQuantifySession(job);
  try {
    session.deliver(batchItem(entry, session.setup));
  } catch (error) {
    session.abort();
    throw error;
  }
  return completeRun(session, started, { total: 1, workers: 0, stopped: false, workersOutOfMemory: 0 });
}
