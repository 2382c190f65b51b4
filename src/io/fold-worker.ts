/** Worker thread entry: fits the folds it is sent on the shared table (see fold-workers.ts). */
import { parentPort, workerData } from 'node:worker_threads';
import { runJob, type ExecData, type FoldJob } from '../run/executor.js';
import { toWorkerError } from './worker-errors.js';

const w = workerData as {
  protocol: Parameters<typeof runJob>[0];
  rows: number;
  cols: number;
  data: SharedArrayBuffer;
  columns?: SharedArrayBuffer;
  y: SharedArrayBuffer;
  classes: string[];
  featureNames: string[];
  /** Ids and groups: only a tuned protocol's inner splits read them (empty otherwise). */
  ids: string[];
  groups?: string[];
  /** Every job, and the shared counter (one Int32) each thread claims the next job's index from. */
  jobs: FoldJob[];
  claim: SharedArrayBuffer;
};
const table: ExecData = {
  X: { rows: w.rows, cols: w.cols, data: new Float64Array(w.data) },
  y: new Int32Array(w.y),
  classes: w.classes,
  featureNames: w.featureNames,
  columns: w.columns && new Float64Array(w.columns),
  ids: w.ids,
  groups: w.groups,
};

// Jobs are claimed from the shared counter until none is left (this thread and the others take from it too).
const claim = new Int32Array(w.claim);
for (let i = Atomics.add(claim, 0, 1); i < w.jobs.length; i = Atomics.add(claim, 0, 1)) {
  const job = w.jobs[i];
  try {
    const fit = runJob(w.protocol, table, job);
    // A later part of a split fold sends its probabilities only: the first part carries the fold's models.
    const sent = job.part ? { proba: fit.proba } : fit;
    parentPort!.postMessage({ index: job.index, fit: sent }, [fit.proba.buffer as ArrayBuffer]);
  } catch (e) {
    parentPort!.postMessage({ index: job.index, error: toWorkerError(e) });
    break;
  }
}
