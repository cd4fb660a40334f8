/**
 * How the quantify engine (`quantify-run.ts`) spreads a list of scans over threads: scans are read
 * and quantified one after another in this thread, or in worker threads (`worker.ts`) that each
 * take chunks of paths; either way items (a scan's result lines, its failure, its entry if kept)
 * come back to the caller strictly in input order, a few chunks at a time, so memory stays flat in
 * the number of scans. A stop request (Ctrl-C, SIGTERM) ends the dispatch of new chunks; the
 * chunks already handed out are finished and delivered, then the engine returns.
 */
import { createRequire } from 'node:module';
import { availableParallelism, loadavg } from 'node:os';
import { pathToFileURL } from 'node:url';
import { Worker, type WorkerOptions } from 'node:worker_threads';
import { computedQuantiles } from '../stats/distributions.js';
import {
  createScanQuantifier,
  type BatchItem,
  type BatchSetup,
  type ScanQuantifier,
} from './scan-quantifier.js';

/** A chunk of paths sent to a worker; `first` is the input index of the chunk's first path. */
export interface WorkerTask {
  first: number;
  paths: string[];
}

/** What a worker starts from: the batch setup and the t and F quantiles this thread has computed. */
export interface WorkerStart {
  setup: BatchSetup;
  quantiles: [string, number][];
}

/** A worker's answer: the chunk's items in order, or the text of a fault that is not about a scan. */
export type WorkerReply = { first: number; items: BatchItem[] } | { first: number; fault: string };

/** Heap limits of a worker thread, MB (see {@link WORKER_HEAP_LIMITS}). */
export interface WorkerHeapLimits {
  maxYoungGenerationSizeMb: number;
  maxOldGenerationSizeMb: number;
}

/** Options of {@link runBatch}. */
export interface RunBatchOptions {
  /**
   * Worker threads that quantify (this thread then only writes); 0 quantifies in this thread, as
   * does a setup that keeps spectra.
   */
  workers: number;
  /** Paths per message to a worker (default 8). */
  chunkSize?: number;
  /** Receives every scan's item, in input order, with its index. */
  onItem: (item: BatchItem, index: number) => void;
  /** Asked between scans (this thread) or chunks (workers): true stops the batch early. */
  shouldStop?: () => boolean;
  /** Heap limits of each worker (default {@link WORKER_HEAP_LIMITS}). */
  workerHeap?: WorkerHeapLimits;
}

/** What a batch did. */
export interface BatchOutcome {
  /** Items delivered (results and failures). */
  delivered: number;
  /** Whether the batch stopped before its last path. */
  stopped: boolean;
  /** Workers that ran out of heap; their chunks were quantified in this thread instead. */
  workersOutOfMemory: number;
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
 * slower than this thread alone, and they add some 20 MB to the peak RSS. One worker never pays
 * (it does this thread's work at the same speed). A scan from standard input keeps the batch
 * in this thread.
 *
 * @param requested - `auto` or a count (0 = this thread)
 * @param scans - number of scans
 * @param fromStdin - whether a path is `-`
 * @param machine - cores (default `os.availableParallelism()`) and 1-minute load average
 *   (default `os.loadavg()[0]`; 0 where the system does not report one)
 */
export function workerCount(
  requested: 'auto' | number,
  scans: number,
  fromStdin: boolean,
  machine: { cores?: number; load?: number } = {},
): number {
  if (fromStdin || scans === 0) return 0;
  if (requested !== 'auto') return Math.min(requested, scans);
  const cores = machine.cores ?? availableParallelism();
  const idle = Math.round(cores - (machine.load ?? loadavg()[0] ?? 0));
  if (cores < 2 || scans < MIN_SCANS_FOR_WORKERS || idle < 2) return 0;
  return Math.min(idle, cores, 8);
}

/**
 * How to start a worker: the compiled `worker.js` beside this file in `dist/`; or, when this
 * file itself runs from source (tsx, vitest), a small bootstrap that registers tsx's loader in the
 * new thread (a loader given in `execArgv` does not reach worker threads on Node 20) and then
 * imports `worker.ts`.
 */
function workerStart(data: WorkerStart): { script: URL | string; options: WorkerOptions } {
  const here = import.meta.url;
  if (!here.endsWith('.ts')) return { script: new URL('./worker.js', here), options: { workerData: data } };
  const api = pathToFileURL(
    createRequire(here)
      .resolve('tsx/esm/api')
      .replace(/\.cjs$/, '.mjs'),
  ).href;
  const target = new URL('./worker.ts', here).href;
  const code =
    `import(${JSON.stringify(api)})` +
    `.then((tsx) => { tsx.register(); return import(${JSON.stringify(target)}); })` +
    '.catch((error) => { setImmediate(() => { throw error; }); });';
  return { script: code, options: { eval: true, workerData: data } };
}

/**
 * Quantifies every path, delivering items in input order. With workers, this thread only hands
 * out chunks and passes the items on (it writes the outputs); the workers quantify. A worker that
 * runs out of heap (a scan far larger than usual) is stopped and its chunks are quantified in
 * this thread, so such a batch still completes with the same results.
 *
 * @param setup - calibration, options, y-kind, line formats (sent to each worker)
 * @param paths - scan paths in input order
 * @param options - worker count, chunk size, the item callback, the stop test
 * @returns how many items were delivered, whether the batch stopped early, workers lost to heap
 * @throws Error when a worker fails for a reason that is not about a scan, or when `onItem`
 *   throws (the workers are stopped first)
 */
export async function runBatch(
  setup: BatchSetup,
  paths: readonly string[],
  options: RunBatchOptions,
): Promise<BatchOutcome> {
  const shouldStop = options.shouldStop ?? (() => false);
  const quantify = createScanQuantifier(setup);
  if (options.workers <= 0 || paths.length === 0 || setup.keepSpectra === true)
    return runHere(quantify, paths, 0, options.onItem, shouldStop);
  // This thread quantifies scans until one gives a result: the t and F quantiles it needed are
  // then handed to the workers, which so need not load the distribution kernels (about 10 MB of
  // memory each; `stats/distributions.ts`).
  let first = 0;
  for (let quantified = false; first < paths.length && !quantified; first++) {
    if (shouldStop()) return { delivered: first, stopped: true, workersOutOfMemory: 0 };
    const item = quantify(paths[first] as string);
    options.onItem(item, first);
    quantified = item.error === undefined;
  }
  if (first === paths.length) return { delivered: first, stopped: false, workersOutOfMemory: 0 };
  const rest = await runInWorkers(
    { setup, quantiles: computedQuantiles() },
    quantify,
    paths,
    first,
    options,
    shouldStop,
  );
  return { ...rest, delivered: first + rest.delivered };
}

async function runHere(
  quantify: ScanQuantifier,
  paths: readonly string[],
  from: number,
  onItem: RunBatchOptions['onItem'],
  shouldStop: () => boolean,
): Promise<BatchOutcome> {
  let lastYield = performance.now();
  for (let i = from; i < paths.length; i++) {
    if (shouldStop()) return { delivered: i - from, stopped: true, workersOutOfMemory: 0 };
    onItem(quantify(paths[i] as string), i);
    // Let signals, timers and progress output through now and then.
    const now = performance.now();
    if (now - lastYield > 25) {
      await new Promise<void>((resolve) => setImmediate(resolve));
      lastYield = performance.now();
    }
  }
  return { delivered: paths.length - from, stopped: false, workersOutOfMemory: 0 };
}

function runInWorkers(
  start: WorkerStart,
  quantifyHere: ScanQuantifier,
  paths: readonly string[],
  from: number,
  options: RunBatchOptions,
  shouldStop: () => boolean,
): Promise<BatchOutcome> {
  const launch = workerStart(start);
  const chunkSize = options.chunkSize ?? 8;
  const resourceLimits = options.workerHeap ?? WORKER_HEAP_LIMITS;
  return new Promise<BatchOutcome>((resolve, reject) => {
    /** Each running worker with the chunks it holds, oldest first (a worker answers in order). */
    const running = new Map<Worker, WorkerTask[]>();
    const ready = new Map<number, BatchItem[]>();
    let next = from;
    let nextToDeliver = from;
    let stopped = false;
    let settled = false;
    let outOfMemory = 0;
    const finish = (error?: unknown): void => {
      if (settled) return;
      settled = true;
      for (const worker of running.keys()) void worker.terminate();
      if (error === undefined)
        resolve({ delivered: nextToDeliver - from, stopped, workersOutOfMemory: outOfMemory });
      else reject(error instanceof Error ? error : new Error('the batch failed', { cause: error }));
    };
    /** The next chunk of paths, or undefined when there is none or a stop was asked. */
    const take = (): WorkerTask | undefined => {
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
      running.get(worker)?.push(task);
      worker.postMessage(task);
    };
    const deliver = (): void => {
      for (let items = ready.get(nextToDeliver); items !== undefined; items = ready.get(nextToDeliver)) {
        ready.delete(nextToDeliver);
        for (const item of items) options.onItem(item, nextToDeliver++);
      }
    };
    const inFlight = (): number => {
      let count = 0;
      for (const tasks of running.values()) count += tasks.length;
      return count;
    };
    let finishingHere = false;
    const finishWhenDone = (): void => {
      if (running.size > 0) {
        if (inFlight() === 0) finish();
        return;
      }
      // Every worker ran out of heap: the rest of the batch is done here.
      if (finishingHere) return;
      finishingHere = true;
      const deliverHere = (item: BatchItem, index: number): void => {
        ready.set(index, [item]);
        deliver();
      };
      runHere(quantifyHere, paths, next, deliverHere, () => stopped || shouldStop()).then((outcome) => {
        stopped = stopped || outcome.stopped;
        finish();
      }, finish);
    };
    /** A worker ran out of heap: its chunks are quantified here, the others go on. */
    const retire = (worker: Worker): void => {
      const tasks = running.get(worker) ?? [];
      running.delete(worker);
      void worker.terminate();
      outOfMemory++;
      for (const task of tasks) ready.set(task.first, task.paths.map(quantifyHere));
      deliver();
      finishWhenDone();
    };
    for (let w = 0; w < options.workers; w++) {
      const worker = new Worker(launch.script, { ...launch.options, resourceLimits });
      running.set(worker, []);
      worker.on('message', (reply: WorkerReply) => {
        // A retired worker's late answer: its chunks were redone here.
        if (settled || !running.has(worker)) return;
        running.get(worker)?.shift();
        if ('fault' in reply) {
          finish(new Error(`worker thread: ${reply.fault}`));
          return;
        }
        ready.set(reply.first, reply.items);
        try {
          deliver();
        } catch (error) {
          finish(error);
          return;
        }
        dispatch(worker);
        finishWhenDone();
      });
      worker.on('error', (error: Error & { code?: string }) => {
        if (settled || !running.has(worker)) return;
        if (error.code !== 'ERR_WORKER_OUT_OF_MEMORY') {
          finish(error);
          return;
        }
        try {
          retire(worker);
        } catch (failure) {
          finish(failure);
        }
      });
      worker.on('exit', (code) => {
        if (!settled && running.has(worker))
          finish(new Error(`worker thread stopped with exit code ${code} before the batch was done`));
      });
    }
    // Two chunks per worker in flight, so a worker never waits for this thread.
    for (let round = 0; round < 2; round++) for (const worker of running.keys()) dispatch(worker);
    finishWhenDone();
  });
}

/**
 * Heap limits of a worker thread. The young generation: 8 MB rather than 16 gave the same speed
 * with two workers on 14,000-point scans and a smaller process. The old generation: without a
 * limit V8 lets each worker's promoted garbage grow for tens of thousands of scans before a full
 * collection (the process grew from 150 MB at 10,000 scans to over 200 MB at 30,000); 32 MB, some
 * four times a worker's live heap (calibration, code, one scan in hand; typed arrays are outside
 * it), keeps it flat at the same speed (bench/batch.ts). A worker that still runs out (a scan far
 * larger than usual) hands its chunks back to this thread.
 */
export const WORKER_HEAP_LIMITS: WorkerHeapLimits = {
  maxYoungGenerationSizeMb: 8,
  maxOldGenerationSizeMb: 32,
};
