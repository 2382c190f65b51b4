/**
 * The fold executor: the one module that knows how the (repeat, fold) fits of a protocol are
 * done. Given a protocol it picks a strategy — from class moments, the model after moment
 * pipelines, or on rows (whole matrix or column at a time) — and turns the plans into jobs
 * that anyone can run: this thread (`runJobs`), or worker threads in the shell
 * (io/fold-workers.ts), which only decides how many threads and hands each job to `runJob`.
 * Whatever runs them, a job's result is the same bits. Pure.
 */
import { canFitByMoments, fitByMoments, modelFromMoments, momentPipelines } from './fit-by-moments.js';
import { atFold, fitFold, fitModelAfterPipeline, type FoldData, type FoldFit } from './fit-fold.js';
import type { FittedPipeline } from '../preprocess/pipeline.js';
import { columnMajor, fitsByColumns } from '../preprocess/by-columns.js';
import type { Protocol } from '../protocol/types.js';
import type { Assignment } from '../split/assignment.js';
import type { Table } from '../table/table.js';

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
  | 'rows';

export function strategyFor(p: Pick<Protocol, 'preprocess' | 'model'>): Strategy {
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
  train: Int32Array;
  test: Int32Array;
  pipeline?: FittedPipeline;
}

/** The jobs of a strategy that fits per fold (everything but 'moments'). */
export function jobsFor(p: Pick<Protocol, 'preprocess' | 'model'>, table: Table, a: Assignment, plans: readonly FoldPlanLike[]): FoldJob[] {
  const pipelines = strategyFor(p) === 'moment-pipelines' ? momentPipelines(p, table, a, plans as never).map((f) => f.pipeline) : undefined;
  return plans.map((plan, index) => ({ index, train: plan.train, test: plan.test, pipeline: pipelines?.[index] }));
}

/** Runs one job (on any thread): the same arithmetic, so the same bits, wherever it runs. */
export function runJob(p: Pick<Protocol, 'preprocess' | 'model'>, data: FoldData, job: FoldJob): FoldFit {
  return job.pipeline ? fitModelAfterPipeline(p, data, job.pipeline, job.train, job.test) : fitFold(p, data, job.train, job.test);
}

/** Every plan fitted on this thread, in plan order; `onFold` after each. */
export function runAll(
  p: Protocol,
  table: Table,
  a: Assignment,
  plans: readonly FoldPlanLike[],
  onFold?: (done: number, total: number) => void,
): FoldFit[] {
  if (strategyFor(p) === 'moments') {
    const fits = fitByMoments(p, table, a, plans as never);
    onFold?.(plans.length, plans.length);
    return fits;
  }
  const data: FoldData = { ...table, columns: wantsColumns(p) ? columnMajor(table.X) : undefined };
  return jobsFor(p, table, a, plans).map((job, i) => {
    let fit: FoldFit;
    try {
      fit = runJob(p, data, job);
    } catch (e) {
      throw atFold(e, plans[i].repeat, plans[i].fold);
    }
    onFold?.(i + 1, plans.length);
    return fit;
  });
}
