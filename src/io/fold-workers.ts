/**
 * Fits the folds on several threads when the job is large enough to pay for them: this thread
 * and N − 1 others (workers, or the row thread that helped read the table), each claiming the
 * next job from a shared counter. Each fold runs the same pure runJob on the same inputs, and
 * results are assembled in plan order, so the output is byte-identical to the serial loop.
 */
import { availableParallelism } from 'node:os';
import { heapFlagsForWorker } from './heap-flags.js';
import { MessageChannel, type MessagePort, Worker } from 'node:worker_threads';
import type { FoldThreadData } from './fold-jobs.js';
import type { RowThread } from './row-helper.js';
import { forcedThreads } from './threads.js';
import { fromWorkerError, type WorkerError } from './worker-errors.js';
import type { ModelKind, Protocol } from '../protocol/types.js';
import { models } from '../model/registry.js';
import type { Assignment } from '../split/assignment.js';
import type { Table } from '../table/table.js';
import { assembleResult, atFold, crossValidate, type FoldPlan, planFolds, type CvHooks, type CvResult } from '../run/cross-validate.js';
import { idOrder } from '../split/key.js';
import type { FoldFit } from '../run/fit-fold.js';
import { type ExecData, jobsFor, joinParts, partsFor, runJob, splitJobs, strategyFor, wantsColumns } from '../run/executor.js';
import { columnMajor } from '../preprocess/by-columns.js';
import { candidates } from '../protocol/grid.js';
import { innerFits } from '../run/nested.js';

/**
 * The work (in the models' units, see ModelCapabilities.work: about 60 ns each) below which
 * thread start-up costs more than it saves: a worker takes about 0.3 s to start and load its
 * code here, so it pays from about twice that.
 */
const MIN_WORK = 10_000_000;

/** `weight`: fits per fold (a tuned fold fits every candidate on every inner fold first). */
export function threadCount(table: Table, folds: number, weight = 1, kind?: ModelKind): number {
  const forced = forcedThreads();
  if (forced !== undefined) return forced;
  // Workers load compiled JavaScript; from TypeScript sources (tests) the serial loop runs.
  if (!import.meta.url.endsWith('.js')) return 1;
  const perFold = (kind && models[kind].capabilities?.work?.(table.X.rows, table.X.cols)) ?? table.X.rows * table.X.cols;
  if (perFold * folds * weight < MIN_WORK) return 1;
  return Math.max(1, Math.min(availableParallelism(), folds, 8));
}

/** What every fold thread reads of the table: its numbers and classes in shared memory, and its names. */
function sharedTable(table: Table): Pick<FoldThreadData, 'rows' | 'cols' | 'data' | 'y' | 'classes' | 'featureNames'> {
  const y = new SharedArrayBuffer(table.y.byteLength);
  new Int32Array(y).set(table.y);
  return {
    rows: table.X.rows,
    cols: table.X.cols,
    data: sharedCopy(table.X.data),
    y,
    classes: table.classes,
    featureNames: table.featureNames,
  };
}

/**
 * The numbers in shared memory: the array's own when it already is (a table parsed on two threads;
 * the memory may run on past the array, the threads read rows × cols), else a copy.
 */
function sharedCopy(a: Float64Array): SharedArrayBuffer {
  const b = a.buffer;
  if (b instanceof SharedArrayBuffer && a.byteOffset === 0) return b;
  const copy = new SharedArrayBuffer(a.byteLength);
  new Float64Array(copy).set(a);
  return copy;
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
  /**
   * `here: false`: every fold on a worker, none on this thread (tests of the workers). `helper`:
   * the thread that helped read the table, already started: it takes the place of one worker.
   */
  { here = true, helper }: { here?: boolean; helper?: RowThread } = {},
): Promise<CvResult> {
  const plans = planFolds(p, table, a);
  // Fits from class moments go to the thread that helped read the table, all at once, while this one does its own work.
  if (helper && strategyFor(p) === 'moments') return momentsOnHelper(p, table, a, plans, hooks, meanwhile, helper);
  const threads = threadCount(table, plans.length, p.tune ? candidates(p.grid).length * innerFits(p.tune.split) : 1, p.model.kind);
  // Fits from class moments cost little per fold: no thread pays for its start-up there. Every
  // other strategy comes as jobs from the executor, which the workers run as they are.
  if (threads < 2 || !import.meta.url.endsWith('.js') || strategyFor(p) === 'moments') {
    meanwhile();
    return crossValidate(p, table, a, hooks, plans);
  }
  const parts = partsFor(p, plans.length, threads);
  const jobs = splitJobs(jobsFor(p, table, a, plans), parts);
  let columns: SharedArrayBuffer | undefined;
  if (wantsColumns(p)) {
    columns = new SharedArrayBuffer(table.X.data.byteLength);
    columnMajor(table.X, new Float64Array(columns));
  }
  // Jobs are taken in order from one shared counter, by the workers and by this thread alike, so
  // no thread waits for another to hand it work.
  const claim = new Int32Array(new SharedArrayBuffer(4));
  const workerData: FoldThreadData = {
    protocol: { preprocess: p.preprocess, model: p.model, grid: p.grid, tune: p.tune, data: p.data },
    ...sharedTable(table),
    columns,
    ids: p.tune ? table.ids : [],
    groups: p.tune ? table.groups : undefined,
    jobs,
    claim: claim.buffer,
  };
  const fits: FoldFit[] = new Array(jobs.length);
  // This thread is one of the `threads`: it has its code loaded already, where a worker spends a
  // fifth of a 5,000 × 200 logistic run starting up.
  const count = here ? threads - 1 : threads;
  const fromHelper = helper && count > 0 ? new MessageChannel() : undefined;
  if (fromHelper) helper!.folds(workerData, fromHelper.port2);
  const workers = Array.from(
    { length: fromHelper ? count - 1 : count },
    () => new Worker(new URL('./fold-worker.js', import.meta.url), { workerData: { ...workerData, ...heapFlagsForWorker() } }),
  );
  const sources: (Worker | MessagePort)[] = fromHelper ? [fromHelper.port1, ...workers] : workers;
  try {
    await new Promise<void>((resolve, reject) => {
      let done = 0;
      const finish = (index: number, fit: FoldFit) => {
        fits[index] = fit;
        // Counted outside the optional call: `f?.(++done)` skips the increment when there is no f.
        done++;
        // Progress in folds: every `parts` jobs done count as one.
        if (done % parts === 0) hooks.onFold?.(done / parts, plans.length);
        if (done === jobs.length) resolve();
      };
      const failed = (index: number, e: unknown) => {
        const plan = plans[Math.floor(index / parts)];
        reject(atFold(e, plan.repeat, plan.fold));
      };
      for (const w of sources) {
        w.on('message', (m: { index: number; fit?: FoldFit; error?: WorkerError }) => {
          /* c8 ignore next -- the row thread could not load its fold code: a bug in foldseal */
          if (m.index < 0) reject(fromWorkerError(m.error!));
          else if (m.error) failed(m.index, fromWorkerError(m.error));
          else finish(m.index, m.fit!);
        });
      }
      for (const w of workers) w.on('error', reject);
      // This thread's own work first, while the workers start up and fit; then folds, as a worker does.
      meanwhile();
      if (!here) return;
      const local: ExecData = { ...table, columns: columns && new Float64Array(columns) };
      for (let i = Atomics.add(claim, 0, 1); i < jobs.length; i = Atomics.add(claim, 0, 1)) {
        try {
          finish(i, runJob(p, local, jobs[i]));
        } catch (e) {
          failed(i, e);
          Atomics.store(claim, 0, jobs.length);
          return;
        }
      }
    });
  } finally {
    fromHelper?.port1.close();
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return assembleResult(p, table, a, plans, joinParts(fits, parts));
}

/**
 * Every fold of a protocol fitted from class moments, on the thread that helped read the table
 * (its fold code loaded meanwhile), while this thread does `meanwhile` (the audit): the same
 * fitByMoments on the same numbers, so the same bits as here.
 */
async function momentsOnHelper(
  p: Protocol,
  table: Table,
  a: Assignment,
  plans: readonly FoldPlan[],
  hooks: CvHooks,
  meanwhile: () => void,
  helper: RowThread,
): Promise<CvResult> {
  const data: FoldThreadData = {
    protocol: { preprocess: p.preprocess, model: p.model, data: p.data },
    ...sharedTable(table),
    ids: [],
    jobs: [],
    claim: new SharedArrayBuffer(4),
    moments: {
      fold: a.fold,
      folds: a.folds,
      order: idOrder(table.ids),
      plans: plans.map(({ repeat, fold, test }) => ({ repeat, fold, test })),
    },
  };
  const channel = new MessageChannel();
  try {
    const fitted = new Promise<FoldFit[]>((resolve, reject) => {
      channel.port1.once('message', (m: { fits?: FoldFit[]; error?: WorkerError }) =>
        m.error ? reject(fromWorkerError(m.error)) : resolve(m.fits!),
      );
    });
    helper.folds(data, channel.port2);
    meanwhile();
    const fits = await fitted;
    hooks.onFold?.(plans.length, plans.length);
    return assembleResult(p, table, a, plans, fits);
  } finally {
    channel.port1.close();
  }
}
