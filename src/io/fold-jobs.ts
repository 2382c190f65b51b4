/**
 * The fold jobs a thread other than the main one fits: every job is claimed from one shared
 * counter (the main thread and the other threads take from it too) and its fit posted back.
 * Run by the fold worker (fold-worker.ts) and by the row thread once its reading is done
 * (row-worker.ts), both as plain data in, messages out.
 */
import { runJob, type ExecData, type FoldJob } from '../run/executor.js';
import { toWorkerError } from './worker-errors.js';

/** What a fold thread receives: the protocol's parts, the table's numbers in shared memory, the jobs and the counter. */
export interface FoldThreadData {
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
}

export function fitClaimedJobs(w: FoldThreadData, post: (message: unknown, transfer: ArrayBuffer[]) => void): void {
  const table: ExecData = {
    X: { rows: w.rows, cols: w.cols, data: new Float64Array(w.data) },
    y: new Int32Array(w.y),
    classes: w.classes,
    featureNames: w.featureNames,
    columns: w.columns && new Float64Array(w.columns),
    ids: w.ids,
    groups: w.groups,
  };
  const claim = new Int32Array(w.claim);
  for (let i = Atomics.add(claim, 0, 1); i < w.jobs.length; i = Atomics.add(claim, 0, 1)) {
    const job = w.jobs[i];
    try {
      const fit = runJob(w.protocol, table, job);
      // A later part of a split fold sends its probabilities only: the first part carries the fold's models.
      const sent = job.part ? { proba: fit.proba } : fit;
      post({ index: job.index, fit: sent }, [fit.proba.buffer as ArrayBuffer]);
    } catch (e) {
      post({ index: job.index, error: toWorkerError(e) }, []);
      return;
    }
  }
}
