/**
 * The fold executor: the one module that knows how the (repeat, fold) fits of a protocol are
 * done. Given a protocol it picks a strategy — from class moments, the model after moment
 * pipelines, or on rows (whole matrix or column at a time) — and turns the plans into jobs
 * that anyone can run: this thread (`runJobs`), or worker threads in the shell
 * (io/fold-workers.ts), which only decides how many threads and hands each job to `runJob`.
 * Whatever runs them, a job's result is the same bits. Pure.
 */
import { canFitByMoments, fitByMoments, modelFromMoments, momentPipelines, type MomentMemo } from './fit-by-moments.js';
import { atFold, fitFold, fitModelAfterPipeline, type FoldData, type FoldFit } from './fit-fold.js';
import type { FittedPipeline } from '../preprocess/pipeline.js';
import { columnMajor, fitsByColumns } from '../preprocess/by-columns.js';
import { positiveClass, type Protocol } from '../protocol/types.js';
import type { Assignment } from '../split/assignment.js';
import { nestedFold, type SearchData, type TunedParts } from './nested.js';
import { models } from '../model/registry.js';

/** What the executor reads of a protocol: the pipeline and model, and the grid and inner split when it tunes. */
export type ExecParts = Pick<Protocol, 'preprocess' | 'model'> & Partial<Pick<Protocol, 'grid' | 'tune' | 'data'>>;

/** The table as the executor sees it: fold data with ids (split keys) and, for the grouped rules, groups. */
export type ExecData = FoldData & { ids: readonly string[]; groups?: readonly string[] };

export interface FoldPlanLike {
  repeat: number;
  fold: number;
  train: Int32Array;
  test: Int32Array;
}

export type Strategy =
  /** Pipeline and model from merged class moments: cheap per fold, done at once on this thread. */
  | 'moments'
  /** Pipelines from class moments, then a model that needs rows fitted per fold (parallel jobs). */
  | 'moment-pipelines'
  /** Everything on the training rows of each fold (parallel jobs); `columns` when the pipeline fits column by column. */
  | 'rows'
  /** A grid search on each fold's training rows, then the winner fitted (parallel jobs, one per outer fold; see nested.ts). */
  | 'tuned';

export function strategyFor(p: ExecParts): Strategy {
  if (p.tune) return 'tuned';
  if (!canFitByMoments(p)) return 'rows';
  return modelFromMoments(p) ? 'moments' : 'moment-pipelines';
}

/** Whether the row fits want the table in column-major order too (column-at-a-time pipelines). */
export function wantsColumns(p: Pick<Protocol, 'preprocess'>): boolean {
  return fitsByColumns(p.preprocess);
}

/** One fold's work as plain data a worker thread can receive: the rows, and a pipeline fitted beforehand when there is one. */
export interface FoldJob {
  index: number;
  repeat: number;
  fold: number;
  train: Int32Array;
  test: Int32Array;
  pipeline?: FittedPipeline;
  /** Set when the job predicts one part of its fold's test rows (splitJobs): the part's number from 0. */
  part?: number;
}

/**
 * Into how many parts each fold's test rows may be split among `threads` threads: more than one
 * only when the model is cheap to fit next to predicting (each part fits again, the same bits)
 * and the folds alone would leave a thread idle at the end.
 */
export function partsFor(p: ExecParts, folds: number, threads: number): number {
  if (p.tune || !models[p.model.kind].capabilities?.cheapFit || folds % threads === 0) return 1;
  return threads;
}

/** Each job as `parts` jobs over consecutive slices of its test rows, numbered in order. */
export function splitJobs(jobs: readonly FoldJob[], parts: number): FoldJob[] {
  if (parts === 1) return [...jobs];
  return jobs.flatMap((job) =>
    Array.from({ length: parts }, (_, part) => {
      const from = Math.floor((job.test.length * part) / parts);
      const to = Math.floor((job.test.length * (part + 1)) / parts);
      return { ...job, index: job.index * parts + part, test: job.test.subarray(from, to), part };
    }),
  );
}

/** The fits of split jobs joined back per fold: the first part's pipeline and model, every part's probabilities in order. */
export function joinParts(fits: readonly Pick<FoldFit, 'proba'>[], parts: number): FoldFit[] {
  if (parts === 1) return fits as FoldFit[];
  const joined: FoldFit[] = [];
  for (let f = 0; f < fits.length; f += parts) {
    const pieces = fits.slice(f, f + parts);
    const proba = new Float64Array(pieces.reduce((sum, x) => sum + x.proba.length, 0));
    let at = 0;
    for (const x of pieces) {
      proba.set(x.proba, at);
      at += x.proba.length;
    }
    joined.push({ ...(pieces[0] as FoldFit), proba });
  }
  return joined;
}

/** The jobs of a strategy that fits per fold (everything but 'moments'). */
export function jobsFor(p: ExecParts, table: ExecData, a: Assignment, plans: readonly FoldPlanLike[], memo?: MomentMemo): FoldJob[] {
  const pipelines =
    strategyFor(p) === 'moment-pipelines' ? momentPipelines(p, table, a, plans as never, memo).map((f) => f.pipeline) : undefined;
  return plans.map((plan, index) => ({
    index,
    repeat: plan.repeat,
    fold: plan.fold,
    train: plan.train,
    test: plan.test,
    pipeline: pipelines?.[index],
  }));
}

/** Runs one job (on any thread): the same arithmetic, so the same bits, wherever it runs. */
export function runJob(p: ExecParts, data: ExecData, job: FoldJob): FoldFit {
  if (p.tune)
    return nestedFold(p as TunedParts, { ...data, positive: positiveClass(p as Protocol, data.classes) } as SearchData, job, runInner);
  return job.pipeline ? fitModelAfterPipeline(p, data, job.pipeline, job.train, job.test) : fitFold(p, data, job.train, job.test);
}

/** Every plan fitted on this thread, in plan order; `onFold` after each; a failure names its repeat and fold. */
export function runAll(
  p: ExecParts,
  table: ExecData,
  a: Assignment,
  plans: readonly FoldPlanLike[],
  onFold?: (done: number, total: number) => void,
): FoldFit[] {
  return fitPlans(p, table, a, plans, onFold, true);
}

/**
 * The inner cross-validation of a grid search: plans fitted as runAll does, failures left to the
 * search to locate; `memo` carries the moments the candidates of one search share.
 */
export function runInner(parts: ExecParts, table: ExecData, a: Assignment, plans: readonly FoldPlanLike[], memo?: MomentMemo): FoldFit[] {
  return fitPlans(parts, table, a, plans, undefined, false, memo);
}

function fitPlans(
  p: ExecParts,
  table: ExecData,
  a: Assignment,
  plans: readonly FoldPlanLike[],
  onFold?: (done: number, total: number) => void,
  locate = false,
  memo?: MomentMemo,
): FoldFit[] {
  if (strategyFor(p) === 'moments') {
    const fits = fitByMoments(p, table, a, plans as never, memo);
    onFold?.(plans.length, plans.length);
    return fits;
  }
  const data: ExecData = { ...table, columns: wantsColumns(p) ? columnMajor(table.X) : undefined };
  return jobsFor(p, table, a, plans, memo).map((job, i) => {
    let fit: FoldFit;
    try {
      fit = runJob(p, data, job);
    } catch (e) {
      throw locate ? atFold(e, plans[i].repeat, plans[i].fold) : e;
    }
    onFold?.(i + 1, plans.length);
    return fit;
  });
}
