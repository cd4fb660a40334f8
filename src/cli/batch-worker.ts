/**
 * Worker thread of a batch: receives chunks of scan paths, answers with their entries in the same
 * order. Started by `batch.ts` with the batch setup as its worker data.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { createScanQuantifier, type BatchSetup } from './batch-scan.js';
import type { WorkerReply, WorkerTask } from './batch.js';

const port = parentPort;
if (port === null) throw new Error('batch-worker.ts runs only as a worker thread');
const quantify = createScanQuantifier(workerData as BatchSetup);
port.on('message', (task: WorkerTask) => {
  let reply: WorkerReply;
  try {
    reply = { first: task.first, entries: task.paths.map(quantify) };
  } catch (error) {
    reply = { first: task.first, fault: error instanceof Error ? (error.stack ?? error.message) : String(error) };
  }
  port.postMessage(reply);
});
