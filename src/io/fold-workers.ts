/**
 * Fits the folds on worker threads when the job is large enough to pay for them. Each fold runs
 * the same pure fitFold on the same inputs, and results are assembled in plan order, so the
 * output is byte-identical to the serial loop.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { forcedThreads } from './threads.js';
import { fromWorkerError, type WorkerError } from './worker-errors.js';
import type { Protocol } from '../protocol/types.js';
import type { Assignment } from '../split/assignment.js';
import type { Table } from '../table/table.js';
import { assembleResult, atFold, crossValidate, planFolds, type CvHooks, type CvResult } from '../run/cross-validate.js';
import type { FoldFit } from '../run/fit-fold.js';
import { jobsFor, joinParts, partsFor, splitJobs, strategyFor, wantsColumns } from '../run/executor.js';
import { columnMajor } from '../preprocess/by-columns.js';
import { candidates } from '../protocol/grid.js';
import { innerFits } from '../run/nested.js';

/** Cells × folds below which thread start-up costs more than it saves. */
const MIN_WORK = 2_000_000;

/** `weight`: fits per fold (a tuned fold fits every candidate on every inner fold first). */
export function threadCount(table: Table, folds: number, weight = 1): number {
  const forced = forcedThreads();
  if (forced !== undefined) return forced;
  // Workers load compiled JavaScript; from TypeScript sources (tests) the serial loop runs.
  if (!import.meta.url.endsWith('.js')) return 1;
  if (table.X.rows * table.X.cols * folds * weight < MIN_WORK) return 1;
  return Math.max(1, Math.min(availableParallelism(), folds, 8));
}

/**
 * `meanwhile`: work for this thread that must come before the folds' own (it runs first when the
 * folds are fitted here, and while the workers start up and fit otherwise).
 */
export async function crossValidateInWorkers(
  p: Protocol,
  table: Table,
  a: Assignment,
  hooks: CvHooks = {},
  meanwhile: () => void = () => {},
): Promise<CvResult> {
  const plans = planFolds(p, table, a);
  const threads = threadCount(table, plans.length, p.tune ? candidates(p.grid).length * innerFits(p.tune.split) : 1);
  // Fits from class moments cost little per fold: no thread pays for its start-up there. Every
  // other strategy comes as jobs from the executor, which the workers run as they are.
  if (threads < 2 || !import.meta.url.endsWith('.js') || strategyFor(p) === 'moments') {
    meanwhile();
    return crossValidate(p, table, a, hooks);
  }
  const parts = partsFor(p, plans.length, threads);
  const jobs = splitJobs(jobsFor(p, table, a, plans), parts);
  const data = new SharedArrayBuffer(table.X.data.byteLength);
  new Float64Array(data).set(table.X.data);
  const y = new SharedArrayBuffer(table.y.byteLength);
  new Int32Array(y).set(table.y);
  let columns: SharedArrayBuffer | undefined;
  if (wantsColumns(p)) {
    columns = new SharedArrayBuffer(table.X.data.byteLength);
    columnMajor(table.X, new Float64Array(columns));
  }
  const workerData = {
    protocol: { preprocess: p.preprocess, model: p.model, grid: p.grid, tune: p.tune, data: p.data },
    rows: table.X.rows,
    cols: table.X.cols,
    data,
    columns,
    y,
    classes: table.classes,
    featureNames: table.featureNames,
    ids: p.tune ? table.ids : [],
    groups: p.tune ? table.groups : undefined,
  };
  const fits: FoldFit[] = new Array(jobs.length);
  const workers = Array.from({ length: threads }, () => new Worker(new URL('./fold-worker.js', import.meta.url), { workerData }));
  try {
    await new Promise<void>((resolve, reject) => {
      let next = 0;
      let done = 0;
      const feed = (w: Worker) => {
        if (next >= jobs.length) return;
        w.postMessage(jobs[next++]);
      };
      for (const w of workers) {
        w.on('message', (m: { index: number; fit?: FoldFit; error?: WorkerError }) => {
          const plan = plans[Math.floor(m.index / parts)];
          if (m.error) {
            reject(atFold(fromWorkerError(m.error), plan.repeat, plan.fold));
            return;
          }
          fits[m.index] = m.fit!;
          // Counted outside the optional call: `f?.(++done)` skips the increment when there is no f.
          done++;
          // Progress in folds: every `parts` jobs done count as one.
          if (done % parts === 0) hooks.onFold?.(done / parts, plans.length);
          if (done === jobs.length) resolve();
          else feed(w);
        });
        w.on('error', reject);
        feed(w);
      }
      // This thread's own work while the workers start up and fit.
      meanwhile();
    });
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return assembleResult(p, table, a, plans, joinParts(fits, parts));
}
