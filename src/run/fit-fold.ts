/** One fold: fit the pipeline and the model on the training rows, predict the test rows. Pure. */
import { fitOptions, models } from '../model/registry.js';
import { FitError } from '../model/types.js';
import { fitPipelineOnRows } from '../preprocess/by-columns.js';
import { applyPipeline, prunePipeline, type FittedPipeline } from '../preprocess/pipeline.js';
import type { Protocol } from '../protocol/types.js';
import type { FoldSearch } from './nested.js';
import { takeInt, type Matrix } from '../table/matrix.js';
import { foldScratch, testScratch } from './fold-scratch.js';

export interface FoldData {
  X: Matrix;
  y: Int32Array;
  classes: readonly string[];
  featureNames: readonly string[];
  /** X in column-major order, when the pipeline fits column by column (see by-columns.ts). */
  columns?: Float64Array;
}

export interface FoldFit {
  pipeline: FittedPipeline;
  model: unknown;
  /** Test rows × classes, in the order of `test`. */
  proba: Float64Array;
  /** The grid search that chose this fold's settings (tuned protocols only). */
  search?: FoldSearch;
}

export function fitFold(p: Pick<Protocol, 'preprocess' | 'model'>, d: FoldData, train: Int32Array, test: Int32Array): FoldFit {
  const k = d.classes.length;
  const yTrain = takeInt(d.y, train);
  const fitted = fitPipelineOnRows(p.preprocess, d.X, train, yTrain, k, d.featureNames, d.columns, foldScratch);
  const pipeline = prunePipeline(fitted.pipeline, d.X.cols);
  const impl = models[p.model.kind];
  const model = impl.fit(fitted.X, yTrain, fitOptions(p.model.kind, p.model.options, d.classes), { classCount: k });
  const proba = impl.predict(model, applyPipeline(pipeline, d.X, test, testScratch));
  return { pipeline, model, proba };
}

/**
 * The model of a fold whose pipeline is already fitted (from class moments): fitted on the
 * training rows through it, then the test rows predicted.
 */
export function fitModelAfterPipeline(
  p: Pick<Protocol, 'model'>,
  d: FoldData,
  pipeline: FittedPipeline,
  train: Int32Array,
  test: Int32Array,
): FoldFit {
  const impl = models[p.model.kind];
  const model = impl.fit(
    applyPipeline(pipeline, d.X, train, foldScratch),
    takeInt(d.y, train),
    fitOptions(p.model.kind, p.model.options, d.classes),
    {
      classCount: d.classes.length,
    },
  );
  return { pipeline, model, proba: impl.predict(model, applyPipeline(pipeline, d.X, test, testScratch)) };
}

/** A fit or transform failure of one fold, its message naming the repeat and fold. */
export function atFold(e: unknown, repeat: number, fold: number): unknown {
  if (e instanceof FitError) return new FitError(e.code, `${e.message} (repeat ${repeat}, fold ${fold})`, e.hint);
  return e;
}
