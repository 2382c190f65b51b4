/** Worker thread entry: permuted scores for the ranges it is sent (see permutation-workers.ts). */
import './worker-start.js';
import { parentPort, workerData } from 'node:worker_threads';
import type { Protocol } from '../protocol/types.js';
import { permutedScores } from '../run/permutation.js';
import type { Assignment } from '../split/assignment.js';
import type { Table } from '../table/table.js';
import { toWorkerError } from './worker-errors.js';

const w = workerData as { protocol: Protocol; table: Table; assignment: Assignment };

parentPort!.on('message', (job: { index: number; range: [number, number] }) => {
  try {
    const scores = permutedScores(w.protocol, w.table, w.assignment, job.range[0], job.range[1]);
    parentPort!.postMessage({ index: job.index, scores }, [scores.buffer as ArrayBuffer]);
  } catch (e) {
    parentPort!.postMessage({ index: job.index, error: toWorkerError(e) });
  }
});
