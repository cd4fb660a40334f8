/**
 * Worker thread of a batch: receives chunks of scan paths, answers with their items in the same
 * order. Started by `engine.ts` with the batch setup and the quantiles computed so far as its
 * worker data.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { adoptQuantiles } from '../stats/distributions.js';
import { createScanQuantifier } from './scan-quantifier.js';
import type { WorkerReply, WorkerStart, WorkerTask } from './engine.js';

const port = parentPort;
if (port === null) throw new Error('worker.ts runs only as a worker thread');
const start = workerData as WorkerStart;
adoptQuantiles(start.quantiles);
const quantify = createScanQuantifier(start.setup);
port.on('message', (task: WorkerTask) => {
  let reply: WorkerReply;
  try {
    reply = { first: task.first, items: task.paths.map(quantify) };
  } catch (error) {
    reply = {
      first: task.first,
      fault: error instanceof Error ? (error.stack ?? error.message) : String(error),
    };
  }
  port.postMessage(reply);
});
