/** Worker thread entry: parses the rows, or derives the split keys, it is sent (see row-helper.ts). */
import { workerData, parentPort, type MessagePort } from 'node:worker_threads';
import { deriveKeys } from '../split/key.js';
import { extractRows, type PlainTable } from '../table/plain.js';

const port = (workerData as { port: MessagePort }).port;

type Job =
  | { kind: 'rows'; table: PlainTable; numberCols: number[]; textCols: number[]; from: number; to: number; numbers: Float64Array; done: Int32Array }
  | { kind: 'keys'; ids: string[]; seed: number; repeat: number; out: Uint8Array; done: Int32Array };

parentPort!.on('message', (job: Job) => {
  try {
    if (job.kind === 'rows') port.postMessage({ part: extractRows(job.table, job.numberCols, job.textCols, job.from, job.to, job.numbers) });
    else {
      job.out.set(deriveKeys(job.ids, job.seed, job.repeat));
      port.postMessage({});
    }
  } catch (e) {
    port.postMessage({ error: String((e as Error).stack ?? e) });
  }
  Atomics.store(job.done, 0, 1);
  Atomics.notify(job.done, 0);
});
