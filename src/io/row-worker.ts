/** Worker thread entry: hashes the file, parses the rows, or derives the split keys it is sent (see row-helper.ts). */
import { createHash } from 'node:crypto';
import { workerData, parentPort, type MessagePort } from 'node:worker_threads';
import { deriveKeys } from '../split/key.js';
import type { PlainTable } from '../table/plain.js';
import { extractRows } from '../table/plain-rows.js';

const port = (workerData as { port: MessagePort }).port;

type Job = { id: number; done: Int32Array } & (
  | { kind: 'hash'; bytes: Uint8Array }
  | { kind: 'rows'; table: PlainTable; numberCols: number[]; textCols: number[]; from: number; to: number; numbers: Float64Array }
  | { kind: 'keys'; ids: string[]; seed: number; repeat: number; out: Uint8Array }
);

parentPort!.on('message', (job: Job) => {
  try {
    if (job.kind === 'hash') port.postMessage({ id: job.id, sha256: createHash('sha256').update(job.bytes).digest('hex') });
    else if (job.kind === 'rows') port.postMessage({ id: job.id, part: extractRows(job.table, job.numberCols, job.textCols, job.from, job.to, job.numbers) });
    else {
      job.out.set(deriveKeys(job.ids, job.seed, job.repeat));
      port.postMessage({ id: job.id });
    }
  } catch (e) {
    port.postMessage({ id: job.id, error: String((e as Error).stack ?? e) });
  }
  Atomics.store(job.done, 0, 1);
  Atomics.notify(job.done, 0);
});
