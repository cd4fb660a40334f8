/**
 * The batch engine behind `quantify` on many scans: scans are read and quantified one after
 * another in this thread, or in worker threads (`batch-worker.ts`) that each take chunks of paths;
 * either way entries come back to the caller strictly in input order, a few chunks at a time, so
 * memory stays flat in the number of scans. A stop request (Ctrl-C, SIGTERM) ends the dispatch of
 * new chunks; the chunks already handed out are finished and delivered, then the engine returns.
 */
import { createRequire } from 'node:module';
import { availableParallelism, loadavg } from 'node:os';
import { pathToFileURL } from 'node:url';
import { Worker, type WorkerOptions } from 'node:worker_threads';
import { BandwrightError, type BatchEntry } from '../index.js';
import { createScanQuantifier, type BatchSetup } from './batch-scan.js';

/** A chunk of paths sent to a worker; `first` is the input index of the chunk's first path. */
export interface WorkerTask {
  first: number;
  paths: string[];
}

/** A worker's answer: the chunk's entries in order, or the text of a fault that is not about a scan. */
export type WorkerReply = { first: number; entries: BatchEntry[] } | { first: number; fault: string };

/** Options of {@link runBatch}. */
export interface RunBatchOptions {
  /** Worker threads that quantify (this thread then only writes); 0 quantifies in this thread. */
  workers: number;
  /** Paths per message to a worker (default 8). */
  chunkSize?: number;
  /** Receives every entry, in input order, with its index. */
  onEntry: (entry: BatchEntry, index: number) => void;
  /** Asked between scans (this thread) or chunks (workers): true stops the batch early. */
  shouldStop?: () => boolean;
}

/** What a batch did. */
export interface BatchOutcome {
  /** Entries delivered (results and failures). */
  delivered: number;
  /** Whether the batch stopped before its last path. */
  stopped: boolean;
}

/**
 * `auto` uses workers only for batches of at least this many scans: each worker loads its modules
 * and warms up its compiled code on its own, some 0.5 s of processor time for two workers, which a
 * batch of 1,000 scans of 14,000 points does not win back on two cores (bench/batch.ts).
 */
export const MIN_SCANS_FOR_WORKERS = 2_000;

/**
 * How many worker threads a batch uses (0: this thread quantifies).
 *
 * `auto` takes one worker per idle core — cores less the 1-minute load average, rounded — when at
 * least two are idle and the batch has at least {@link MIN_SCANS_FOR_WORKERS} scans; otherwise
 * none. Measured in `bench/batch.ts` on a 2-core machine: two workers, with this thread only
 * writing, use some 10 % more processor time than this thread alone, so they pay only when two
 * cores are free (close to half the wall time then); with one core busy elsewhere they were
 * slower than this thread alone, and they add 20–40 MB to the peak RSS. One worker never pays
 * (it does this thread's work at the same speed). A scan from standard input keeps the batch
 * in this thread.
 *
 * @param requested - `auto` or a count (0 = this thread)
 * @param scans - number of scans
 * @param fromStdin - whether a path is `-`
 * @param machine - cores (default `os.availableParallelism()`) and 1-minute load average
 *   (default `os.loadavg()[0]`; 0 where the system does not report one)
 */
export function workerCount(requested: 'auto' | number, scans: number, fromStdin: boolean, machine: { cores?: number; load?: number } = {}): number {
  if (fromStdin || scans === 0) return 0;
  if (requested !== 'auto') return Math.min(requested, scans);
  const cores = machine.cores ?? availableParallelism();
  const idle = Math.round(cores - (machine.load ?? loadavg()[0] ?? 0));
  if (cores < 2 || scans < MIN_SCANS_FOR_WORKERS || idle < 2) return 0;
  return Math.min(idle, cores, 8);
}

/**
 * How to start a worker: the compiled `batch-worker.js` beside this file in `dist/`; or, when this
 * file itself runs from source (tsx, vitest), a small bootstrap that registers tsx's loader in the
 * new thread (a loader given in `execArgv` does not reach worker threads on Node 20) and then
 * imports `batch-worker.ts`.
 */
function workerStart(setup: BatchSetup): { script: URL | string; options: WorkerOptions } {
  const here = import.meta.url;
  if (!here.endsWith('.ts')) return { script: new URL('./batch-worker.js', here), options: { workerData: setup } };
  const api = pathToFileURL(createRequire(here).resolve('tsx/esm/api').replace(/\.cjs$/, '.mjs')).href;
  const target = new URL('./batch-worker.ts', here).href;
  const code = `import(${JSON.stringify(api)}).then((tsx) => { tsx.register(); return import(${JSON.stringify(target)}); }).catch((error) => { setImmediate(() => { throw error; }); });`;
  return { script: code, options: { eval: true, workerData: setup } };
}

/**
 * Quantifies every path, delivering entries in input order. With workers, this thread only hands
 * out chunks and passes the entries on (it writes the outputs); the workers quantify.
 *
 * @param setup - calibration, options, y-kind (sent to each worker)
 * @param paths - scan paths in input order
 * @param options - worker count, chunk size, the entry callback, the stop test
 * @returns how many entries were delivered and whether the batch stopped early
 * @throws Error when a worker fails for a reason that is not about a scan, or when `onEntry`
 *   throws (the workers are stopped first)
 */
export async function runBatch(setup: BatchSetup, paths: readonly string[], options: RunBatchOptions): Promise<BatchOutcome> {
  const shouldStop = options.shouldStop ?? (() => false);
  if (options.workers <= 0 || paths.length === 0) return runHere(setup, paths, options.onEntry, shouldStop);
  return runInWorkers(setup, paths, options.workers, options.chunkSize ?? 8, options.onEntry, shouldStop);
}

async function runHere(setup: BatchSetup, paths: readonly string[], onEntry: RunBatchOptions['onEntry'], shouldStop: () => boolean): Promise<BatchOutcome> {
  const quantify = createScanQuantifier(setup);
  let lastYield = performance.now();
  let delivered = 0;
  for (let i = 0; i < paths.length; i++) {
    if (shouldStop()) return { delivered, stopped: true };
    onEntry(quantify(paths[i] as string), i);
    delivered++;
    // Let signals, timers and progress output through now and then.
    const now = performance.now();
    if (now - lastYield > 25) {
      await new Promise<void>((resolve) => setImmediate(resolve));
      lastYield = performance.now();
    }
  }
  return { delivered, stopped: false };
}

function runInWorkers(
  setup: BatchSetup,
  paths: readonly string[],
  count: number,
  chunkSize: number,
  onEntry: RunBatchOptions['onEntry'],
  shouldStop: () => boolean,
): Promise<BatchOutcome> {
  const start = workerStart(setup);
  return new Promise<BatchOutcome>((resolve, reject) => {
    const workers: Worker[] = [];
    const ready = new Map<number, BatchEntry[]>();
    let next = 0;
    let nextToDeliver = 0;
    let inFlight = 0;
    let stopped = false;
    let settled = false;
    const finish = (error?: unknown): void => {
      if (settled) return;
      settled = true;
      for (const worker of workers) void worker.terminate();
      if (error === undefined) resolve({ delivered: nextToDeliver, stopped });
      else reject(error);
    };
    /** The next chunk of paths, or undefined when there is none or a stop was asked. */
    const take = (): { first: number; paths: string[] } | undefined => {
      if (next >= paths.length || stopped) return undefined;
      if (shouldStop()) {
        stopped = true;
        return undefined;
      }
      const first = next;
      const chunk = paths.slice(first, first + chunkSize);
      next += chunk.length;
      return { first, paths: chunk };
    };
    const dispatch = (worker: Worker): void => {
      const task = take();
      if (task === undefined) return;
      inFlight++;
      worker.postMessage(task satisfies WorkerTask);
    };
    const deliver = (): void => {
      for (let entries = ready.get(nextToDeliver); entries !== undefined; entries = ready.get(nextToDeliver)) {
        ready.delete(nextToDeliver);
        for (const entry of entries) onEntry(entry, nextToDeliver++);
      }
    };
    const finishWhenDone = (): void => {
      if (inFlight === 0) finish();
    };
    for (let w = 0; w < count; w++) {
      const worker = new Worker(start.script, { ...start.options, resourceLimits: WORKER_RESOURCE_LIMITS });
      workers.push(worker);
      worker.on('message', (reply: WorkerReply) => {
        if (settled) return;
        inFlight--;
        if ('fault' in reply) {
          finish(new Error(`worker thread: ${reply.fault}`));
          return;
        }
        ready.set(reply.first, reply.entries);
        try {
          deliver();
        } catch (error) {
          finish(error);
          return;
        }
        dispatch(worker);
        finishWhenDone();
      });
      worker.on('error', (error) => finish(error));
      worker.on('exit', (code) => {
        if (!settled) finish(new Error(`worker thread stopped with exit code ${code} before the batch was done`));
      });
    }
    // Two chunks per worker in flight, so a worker never waits for this thread.
    for (let round = 0; round < 2; round++) for (const worker of workers) dispatch(worker);
    finishWhenDone();
  });
}

/**
 * Heap limits of a worker thread: a bounded young generation makes scavenges frequent enough that
 * the spectra of finished scans (held outside the JavaScript heap) are freed soon and the process
 * stays small. 16 MB rather than 4: with two workers on 14,000-point scans it quantified 12 %
 * more scans per second (fewer scavenges) at the same or lower peak RSS (measured with
 * `bench/batch.ts`).
 */
const WORKER_RESOURCE_LIMITS = { maxYoungGenerationSizeMb: 16 } as const;

/**
 * Parses `--workers`: `auto` or a whole number ≥ 0.
 *
 * @param text - the option's text
 * @throws BandwrightError `USAGE` naming the value
 */
export function workersOption(text: string): 'auto' | number {
  if (text === 'auto') return 'auto';
  if (!/^\d+$/.test(text.trim()) || Number(text) > 64) throw new BandwrightError('USAGE', `--workers = ${JSON.stringify(text)}, must be auto or a whole number from 0 to 64`, { parameter: '--workers' });
  return Number(text);
}
