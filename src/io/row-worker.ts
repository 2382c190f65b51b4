/** Worker thread entry: parses the rows it is sent (see row-helper.ts). */
import { workerData, parentPort, type MessagePort } from 'node:worker_threads';
import { extractRows, type PlainTable } from '../table/plain.js';

const port = (workerData as { port: MessagePort }).port;

parentPort!.on('message', (job: { table: PlainTable; numberCols: number[]; textCols: number[]; from: number; to: number; numbers: Float64Array; done: Int32Array }) => {
  try {
    port.postMessage({ part: extractRows(job.table, job.numberCols, job.textCols, job.from, job.to, job.numbers) });
  } catch (e) {
    port.postMessage({ error: String((e as Error).stack ?? e) });
  }
  Atomics.store(job.done, 0, 1);
  Atomics.notify(job.done, 0);
});
