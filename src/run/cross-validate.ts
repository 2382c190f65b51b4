/**
 * The fold loop: for every repeat and fold, fit the pipeline and the model on the training
 * rows only, predict the test rows. Rows are always visited in the split spec's id order, so
 * every floating-point sum is the same for a row-shuffled copy of the data. Pure.
 */
import { metrics as metricFns } from '../metric/registry.js';
import { confusionRows } from '../metric/confusion.js';
import { scored } from '../metric/types.js';
import { fitOptions, models } from '../model/registry.js';
import { applyPipeline, fitPipeline, prunePipeline, type FittedPipeline } from '../preprocess/pipeline.js';
import { warning, type Problem } from '../problems/problem.js';
import { isPinned, type MetricName, type Protocol } from '../protocol/types.js';
import { foldRows, type Assignment } from '../split/assignment.js';
import { idOrder } from '../split/key.js';
import { takeInt, takeRows } from '../table/matrix.js';
import type { Table } from '../table/table.js';
import { meanOf, meanSd, type MetricSummary } from './summary.js';

export interface FoldModel {
  repeat: number;
  fold: number;
  pipeline: FittedPipeline;
  model: unknown;
}

export interface FoldResult {
  repeat: number;
  fold: number;
  trainRows: number;
  testRows: number;
  testClassCounts: number[];
  metrics: Record<string, number | null>;
  /** Accuracy of always predicting the training part's most common class. */
  baselineAccuracy: number;
  confusion: number[][];
}

export interface CvResult {
  classes: string[];
  positive: number;
  metricNames: MetricName[];
  folds: FoldResult[];
  summary: Record<string, MetricSummary>;
  baseline: { mean: number | null; pooled: number | null; largestClassShare: number };
  /** Out-of-fold probabilities per repeat (rows × classes, table row order); rows never tested stay NaN. */
  oof: Float64Array[];
  /** Fold each row was tested in, per repeat (0 = not tested, e.g. holdout training rows). */
  testedIn: Int32Array[];
  models: FoldModel[];
  warnings: Problem[];
}

export function evaluatedFolds(p: Protocol, a: Assignment): number[] {
  const holdout = !isPinned(p.split) && p.split.rule === 'holdout';
  return holdout ? [1] : Array.from({ length: a.folds }, (_, i) => i + 1);
}

export interface CvHooks {
  /** Called after each fitted fold (for progress lines at the edge). */
  onFold?: (done: number, total: number) => void;
}

export function crossValidate(p: Protocol, table: Table, a: Assignment, hooks: CvHooks = {}): CvResult {
  const k = table.classes.length;
  const n = table.ids.length;
  const positive = p.data.positive !== undefined ? table.classes.indexOf(p.data.positive) : k - 1;
  const order = idOrder(table.ids);
  const model = models[p.model.kind];
  const options = fitOptions(p.model.kind, p.model.options, table.classes);
  const folds: FoldResult[] = [];
  const fitted: FoldModel[] = [];
  const warnings: Problem[] = [];
  const oof: Float64Array[] = [];
  const testedIn: Int32Array[] = [];
  const evaluated = evaluatedFolds(p, a);
  const total = a.repeats * evaluated.length;
  for (let r = 1; r <= a.repeats; r++) {
    const proba = new Float64Array(n * k).fill(NaN);
    const tested = new Int32Array(n);
    for (const f of evaluated) {
      const { test, train } = foldRows(a, r, f, order);
      const yTrain = takeInt(table.y, train);
      const trainCounts = new Array<number>(k).fill(0);
      for (let i = 0; i < yTrain.length; i++) trainCounts[yTrain[i]]++;
      trainCounts.forEach((c, cls) => {
        if (c === 0) warnings.push(warning('class-absent-from-training', `class "${table.classes[cls]}" has no row in the training part of repeat ${r}, fold ${f}; that fold's model gives it probability 0`));
      });
      const fitted0 = fitPipeline(p.preprocess, takeRows(table.X, train), yTrain, k, table.featureNames);
      const trainX = fitted0.X;
      const pipeline = prunePipeline(fitted0.pipeline, table.X.cols);
      const params = model.fit(trainX, yTrain, options, { classCount: k });
      const testX = applyPipeline(pipeline, takeRows(table.X, test));
      const foldProba = model.predict(params, testX);
      const yTest = takeInt(table.y, test);
      for (let i = 0; i < test.length; i++) {
        const to = test[i] * k;
        for (let c = 0; c < k; c++) proba[to + c] = foldProba[i * k + c];
        tested[test[i]] = f;
      }
      const s = scored(yTest, foldProba, k, positive);
      const values: Record<string, number | null> = {};
      for (const m of p.metrics) values[m] = metricFns[m](s);
      const majority = trainCounts.indexOf(Math.max(...trainCounts));
      const testClassCounts = new Array<number>(k).fill(0);
      for (let i = 0; i < yTest.length; i++) testClassCounts[yTest[i]]++;
      folds.push({ repeat: r, fold: f, trainRows: train.length, testRows: test.length, testClassCounts, metrics: values, baselineAccuracy: testClassCounts[majority] / test.length, confusion: confusionRows(s) });
      fitted.push({ repeat: r, fold: f, pipeline, model: params });
      hooks.onFold?.(folds.length, total);
    }
    oof.push(proba);
    testedIn.push(tested);
  }
  const summary: Record<string, MetricSummary> = {};
  const pooledByRepeat = pooled(p.metrics, table, oof, testedIn, order, positive);
  for (const m of p.metrics) {
    summary[m] = { ...meanSd(folds.map((f) => f.metrics[m])), pooled: meanOf(pooledByRepeat.map((v) => v[m])) };
  }
  const counts = new Array<number>(k).fill(0);
  for (const c of table.y) counts[c]++;
  const pooledBaseline = meanOf(oof.map((_, r) => {
    let hit = 0;
    let seen = 0;
    for (const f of folds.filter((x) => x.repeat === r + 1)) { hit += f.baselineAccuracy * f.testRows; seen += f.testRows; }
    return hit / seen;
  }));
  return {
    classes: table.classes,
    positive,
    metricNames: p.metrics,
    folds,
    summary,
    baseline: { mean: meanSd(folds.map((f) => f.baselineAccuracy)).mean, pooled: pooledBaseline, largestClassShare: Math.max(...counts) / n },
    oof,
    testedIn,
    models: fitted,
    warnings: dedupe(warnings),
  };
}

function pooled(names: readonly MetricName[], table: Table, oof: Float64Array[], testedIn: Int32Array[], order: Int32Array, positive: number): Record<string, number | null>[] {
  const k = table.classes.length;
  return oof.map((proba, r) => {
    const rows = Array.from(order).filter((i) => testedIn[r][i] > 0);
    const idx = Int32Array.from(rows);
    const p = new Float64Array(rows.length * k);
    rows.forEach((row, i) => p.set(proba.subarray(row * k, (row + 1) * k), i * k));
    const s = scored(takeInt(table.y, idx), p, k, positive);
    const out: Record<string, number | null> = {};
    for (const m of names) out[m] = metricFns[m](s);
    return out;
  });
}

function dedupe(problems: Problem[]): Problem[] {
  const seen = new Set<string>();
  return problems.filter((p) => (seen.has(p.message) ? false : (seen.add(p.message), true)));
}
