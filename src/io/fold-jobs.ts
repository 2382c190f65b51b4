/**
 * The fold jobs a thread other than the main one fits: every job is claimed from one shared
 * counter (the main thread and the other threads take from it too) and its fit posted back.
 * Run by the fold worker (fold-worker.ts) and by the row thread once its reading is done
 * (row-worker.ts), both as plain data in, messages out.
 */
import { runJob, type ExecData, type FoldJob } from '../run/executor.js';
import { fitByMoments } from '../run/fit-by-moments.js';
import { toWorkerError } from './worker-errors.js';

/** What a fold thread receives: the protocol's parts, the table's numbers in shared memory, the jobs and the counter. */
export interface FoldThreadData {
  protocol: Parameters<typeof runJob>[0];
  rows: number;
  cols: number;
  /** rows × cols numbers from its start (the memory may run on past them). */
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
  /**
   * Instead of jobs: every fold of a protocol fitted from class moments, at once (run/fit-by-moments.ts),
   * posted as one message { fits } with their probabilities in one buffer. The rows in id order
   * stand in for the ids; the plans carry their test rows only (moment fits never read the training rows).
   */
  moments?: { fold: Int32Array; folds: number; order: Int32Array; plans: { repeat: number; fold: number; test: Int32Array }[] };
}

export function fitClaimedJobs(w: FoldThreadData, post: (message: unknown, transfer: ArrayBuffer[]) => void): void {
  const table: ExecData = {
    X: { rows: w.rows, cols: w.cols, data: new Float64Array(w.data, 0, w.rows * w.cols) },
    y: new Int32Array(w.y),
    classes: w.classes,
    featureNames: w.featureNames,
    columns: w.columns && new Float64Array(w.columns),
    ids: w.ids,
    groups: w.groups,
  };
  if (w.moments) {
    fitMoments(w, table, w.moments, post);
    return;
  }
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

function fitMoments(
  w: FoldThreadData,
  table: ExecData,
  m: NonNullable<FoldThreadData['moments']>,
  post: (message: unknown, transfer: ArrayBuffer[]) => void,
): void {
  const plans = m.plans.map((plan) => ({
    ...plan,
    get train(): Int32Array {
      /* c8 ignore next -- a moment fit that read its training rows would be a bug in foldseal */
      throw new Error('foldseal: a moment fit asked for training rows it was not sent');
    },
  }));
  try {
    const fits = fitByMoments(w.protocol, { ...table, order: m.order }, m, plans);
    // Each fit's probabilities are a view of one array: it goes across once.
    post({ index: 0, fits }, fits.length ? [fits[0].proba.buffer as ArrayBuffer] : []);
  } catch (e) {
    post({ index: 0, error: toWorkerError(e) }, []);
  }
}
