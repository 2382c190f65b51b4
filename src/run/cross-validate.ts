/**
 * The fold loop: for every repeat and fold, fit the pipeline and the model on the training
 * rows only, predict the test rows. Rows are always visited in the split spec's id order, so
 * every floating-point sum is the same for a row-shuffled copy of the data. Pure.
 */
import { metrics as metricFns } from '../metric/registry.js';
import { confusionRows } from '../metric/confusion.js';
import { scored, scoredRows } from '../metric/types.js';
import type { FittedPipeline } from '../preprocess/pipeline.js';
import type { FoldFit } from './fit-fold.js';
export { atFold } from './fit-fold.js';
import { runAll } from './executor.js';
import { warning, type Problem } from '../problems/problem.js';
import { models } from '../model/registry.js';
import { FitError } from '../model/types.js';
import { positiveClass, testsFoldOneOnly, type MetricName, type Protocol } from '../protocol/types.js';
import { candidates, valuesOf } from '../protocol/grid.js';
import { lazyRepeatRows, type Assignment } from '../split/assignment.js';
import { idOrder } from '../split/key.js';
import { takeInt } from '../table/matrix.js';
import type { Table } from '../table/table.js';
import { meanOf, meanSd, type MetricSummary } from './summary.js';

export interface FoldModel {
  repeat: number;
  fold: number;
  pipeline: FittedPipeline;
  model: unknown;
  /** A tuned protocol's chosen value of each tuned setting for this fold. */
  chosen?: Record<string, number | string>;
  /** The training rows (in id order), for a model that keeps them: models.json references them. */
  train?: Int32Array;
}

/** The grid searches of a tuned protocol: per outer fold, every candidate's mean inner score and the winner. */
export interface TuningResult {
  /** Tuned settings' names, in grid order. */
  settings: string[];
  /** Every candidate's values, in grid order (the first setting varies slowest). */
  candidates: Record<string, number | string>[];
  folds: { repeat: number; fold: number; scores: (number | null)[]; chosen: number }[];
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
  tuning?: TuningResult;
  warnings: Problem[];
}

export function evaluatedFolds(p: Protocol, a: Assignment): number[] {
  return testsFoldOneOnly(p) ? [1] : Array.from({ length: a.folds }, (_, i) => i + 1);
}

export interface CvHooks {
  /** Called after each fitted fold (for progress lines at the edge). */
  onFold?: (done: number, total: number) => void;
}

export interface FoldPlan {
  repeat: number;
  fold: number;
  /** Row indices in the split spec's id order (planFolds lists the training rows when they are first read). */
  readonly train: Int32Array;
  test: Int32Array;
}

/** Every (repeat, fold) to fit, in the order results are reported. */
export function planFolds(p: Protocol, table: Table, a: Assignment): FoldPlan[] {
  const order = idOrder(table.ids);
  const plans: FoldPlan[] = [];
  for (let r = 1; r <= a.repeats; r++) {
    const folds = lazyRepeatRows(a, r, order);
    for (const f of evaluatedFolds(p, a)) {
      const rows = folds[f - 1];
      plans.push({
        repeat: r,
        fold: f,
        test: rows.test,
        get train() {
          return rows.train;
        },
      });
    }
  }
  return plans;
}

/** Every fold on this thread (the executor decides how); the shell may run the executor's jobs on workers instead. `plans`: planFolds, when made already. */
export function crossValidate(p: Protocol, table: Table, a: Assignment, hooks: CvHooks = {}, plans = planFolds(p, table, a)): CvResult {
  return assembleResult(p, table, a, plans, runAll(p, table, a, plans, hooks.onFold));
}

/** Scores, summaries and out-of-fold arrays from the fitted folds (however they were fitted). */
export function assembleResult(p: Protocol, table: Table, a: Assignment, plans: readonly FoldPlan[], fits: readonly FoldFit[]): CvResult {
  const k = table.classes.length;
  const n = table.ids.length;
  const positive = positiveClass(p, table.classes);
  const grid = candidates(p.grid);
  const order = idOrder(table.ids);
  const folds: FoldResult[] = [];
  const fitted: FoldModel[] = [];
  const warnings: Problem[] = [];
  const oof: Float64Array[] = Array.from({ length: a.repeats }, () => new Float64Array(n * k).fill(NaN));
  const testedIn: Int32Array[] = Array.from({ length: a.repeats }, () => new Int32Array(n));
  // Every row's class, for the training parts' class counts: a training part is every row of its repeat but the test part.
  const counts = new Array<number>(k).fill(0);
  for (const c of table.y) counts[c]++;
  // The plan's training rows are not read here (a moments fit never lists them); a model that keeps its rows gets them.
  plans.forEach((plan, index) => {
    const { repeat: r, fold: f, test } = plan;
    const { pipeline, model: params, proba: foldProba } = fits[index];
    const impl = models[p.model.kind];
    for (const note of impl.capabilities?.notes?.(params) ?? [])
      warnings.push(warning('model-note', `${p.model.kind} in repeat ${r}, fold ${f}: ${note}`));
    for (let i = 0; i < foldProba.length; i++) {
      if (!Number.isFinite(foldProba[i])) {
        const row = test[Math.floor(i / k)];
        throw new FitError(
          'non-finite-prediction',
          `${p.model.kind} gave a non-finite probability (${foldProba[i]}) for row "${table.ids[row]}" in repeat ${r}, fold ${f}: ` +
            `the features are too extreme or too degenerate for this model to compute with`,
          'rescale the features (standardize, log2p), or drop constant and near-constant columns',
        );
      }
    }
    const proba = oof[r - 1];
    const tested = testedIn[r - 1];
    const yTest = takeInt(table.y, test);
    const testClassCounts = new Array<number>(k).fill(0);
    for (let i = 0; i < yTest.length; i++) testClassCounts[yTest[i]]++;
    const trainCounts = counts.map((c, cls) => c - testClassCounts[cls]);
    trainCounts.forEach((c, cls) => {
      if (c === 0)
        warnings.push(
          warning(
            'class-absent-from-training',
            `class "${table.classes[cls]}" has no row in the training part of repeat ${r}, fold ${f}; that fold's model gives it ` +
              `probability 0`,
          ),
        );
    });
    for (let i = 0; i < test.length; i++) {
      const to = test[i] * k;
      for (let c = 0; c < k; c++) proba[to + c] = foldProba[i * k + c];
      tested[test[i]] = f;
    }
    const s = scored(yTest, foldProba, k, positive);
    const values: Record<string, number | null> = {};
    for (const m of p.metrics) values[m] = metricFns[m].value(s);
    const majority = trainCounts.indexOf(Math.max(...trainCounts));
    folds.push({
      repeat: r,
      fold: f,
      trainRows: n - test.length,
      testRows: test.length,
      testClassCounts,
      metrics: values,
      baselineAccuracy: testClassCounts[majority] / test.length,
      confusion: confusionRows(s),
    });
    const search = fits[index].search;
    fitted.push({
      repeat: r,
      fold: f,
      pipeline,
      model: params,
      ...(search ? { chosen: valuesOf(p.grid, grid[search.chosen]) } : {}),
      ...(impl.capabilities?.keepsRows ? { train: plan.train } : {}),
    });
  });
  const summary: Record<string, MetricSummary> = {};
  const pooledByRepeat = pooled(p.metrics, table, oof, testedIn, order, positive);
  for (const m of p.metrics) {
    summary[m] = { ...meanSd(folds.map((f) => f.metrics[m])), pooled: meanOf(pooledByRepeat.map((v) => v[m])) };
    const missing = summary[m].undefinedFolds;
    if (missing)
      warnings.push(
        warning(
          'metric-undefined-in-folds',
          `${m} is undefined in ${missing} of ${folds.length} folds (their test part lacks a class the metric needs); its mean ` +
            `and SD are over the other ${folds.length - missing} folds, while the pooled value uses every out-of-fold prediction`,
        ),
      );
  }
  const pooledBaseline = meanOf(
    oof.map((_, r) => {
      let hit = 0;
      let seen = 0;
      for (const f of folds.filter((x) => x.repeat === r + 1)) {
        hit += f.baselineAccuracy * f.testRows;
        seen += f.testRows;
      }
      return hit / seen;
    }),
  );
  return {
    classes: table.classes,
    positive,
    metricNames: p.metrics,
    folds,
    summary,
    baseline: {
      mean: meanSd(folds.map((f) => f.baselineAccuracy)).mean,
      pooled: pooledBaseline,
      largestClassShare: Math.max(...counts) / n,
    },
    oof,
    testedIn,
    models: fitted,
    tuning: p.tune
      ? {
          settings: p.grid.map((g) => g.name),
          candidates: grid.map((pick) => valuesOf(p.grid, pick)),
          folds: plans.map((plan, i) => ({ repeat: plan.repeat, fold: plan.fold, ...fits[i].search! })),
        }
      : undefined,
    warnings: dedupe(warnings),
  };
}

function pooled(
  names: readonly MetricName[],
  table: Table,
  oof: Float64Array[],
  testedIn: Int32Array[],
  order: Int32Array,
  positive: number,
): Record<string, number | null>[] {
  const k = table.classes.length;
  return oof.map((proba, r) => {
    const tested = testedIn[r];
    // Every row tested once (k-fold): the id order itself, without a copy.
    const s = scoredRows(table.y, proba, k, positive, tested.every((f) => f > 0) ? order : order.filter((row) => tested[row] > 0));
    const out: Record<string, number | null> = {};
    for (const m of names) out[m] = metricFns[m].value(s);
    return out;
  });
}

function dedupe(problems: Problem[]): Problem[] {
  const seen = new Set<string>();
  return problems.filter((p) => {
    if (seen.has(p.message)) return false;
    seen.add(p.message);
    return true;
  });
}
