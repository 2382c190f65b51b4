/**
 * Tuning inside a fold (nested cross-validation): on the outer training rows only, the inner
 * split of docs/split-spec.md §9 is drawn, every candidate of the grid is cross-validated on it,
 * the declared metric's mean over inner folds picks the winner (ties by the protocol's `prefer`
 * order), and the winner is fitted on the whole outer training part and predicts the outer test
 * rows. The inner fits go through the fold executor, so they use class moments where the
 * pipeline allows. Pure.
 */
import { metrics as metricFns } from '../metric/registry.js';
import { scored } from '../metric/types.js';
import { FitError } from '../problems/problem.js';
import { candidates, partsFor, valuesOf } from '../protocol/grid.js';
import type { Protocol, TunedSetting, TuneSettings } from '../protocol/types.js';
import { assignFolds } from '../split/assign.js';
import { foldRows, type Assignment } from '../split/assignment.js';
import { splitRules } from '../split/registry.js';
import { allRows } from '../split/rule.js';
import { takeInt, takeRows } from '../table/matrix.js';
import { csvCells } from '../table/csv-write.js';
import { fitFold, type FoldData, type FoldFit } from './fit-fold.js';
import { newMomentMemo, type MomentMemo } from './fit-by-moments.js';

/** What a tuned fit needs of the protocol. */
export type TunedParts = Pick<Protocol, 'preprocess' | 'model' | 'grid'> & { tune: TuneSettings };

/** The table as a tuned fit sees it: the fold data plus the ids (inner keys), groups and the positive class. */
export type SearchData = FoldData & { ids: readonly string[]; groups?: readonly string[]; positive: number };

/** One search: every candidate's mean inner score (null where the metric was undefined in every inner fold) and the winner. */
export interface FoldSearch {
  scores: (number | null)[];
  /** Index of the chosen candidate (grid order: the first tuned setting varies slowest). */
  chosen: number;
}

/** Runs the inner folds of given parts on a table (the fold executor's runAll, passed in to keep this module below it). */
export type InnerRunner = (
  parts: Pick<Protocol, 'preprocess' | 'model'>,
  data: FoldData & { ids: readonly string[] },
  a: Assignment,
  plans: { repeat: number; fold: number; train: Int32Array; test: Int32Array }[],
  memo: MomentMemo,
) => FoldFit[];

/**
 * Searches the grid on rows `train` (in id order) as outer repeat `within.repeat`, fold
 * `within.fold` (0, 0 for the search on every row before a refit).
 */
export function searchGrid(
  p: TunedParts,
  d: SearchData,
  train: Int32Array,
  within: { repeat: number; fold: number },
  run: InnerRunner,
): FoldSearch {
  const k = d.classes.length;
  const input = innerInput(d, train);
  const { ids, y } = input;
  const sub = { X: takeRows(d.X, train), y, classes: d.classes, featureNames: d.featureNames, ids };
  const inner = assignFolds(input, p.tune.split, within);
  // The rows are already in id order, so the inner plans visit them in that order too.
  const order = allRows(ids.length);
  const folds = splitRules[p.tune.split.rule].tests === 'fold-1' ? [1] : Array.from({ length: inner.folds }, (_, i) => i + 1);
  const plans: { repeat: number; fold: number; train: Int32Array; test: Int32Array }[] = [];
  for (let r = 1; r <= inner.repeats; r++) for (const f of folds) plans.push({ repeat: r, fold: f, ...foldRows(inner, r, f, order) });
  const metric = metricFns[p.tune.metric];
  const truths = plans.map((plan) => takeInt(y, plan.test));
  const all = candidates(p.grid);
  const memo = newMomentMemo();
  const scores = all.map((pick) => {
    let fits: FoldFit[];
    try {
      fits = run(partsFor(p, pick), sub, inner, plans, memo);
    } catch (e) {
      throw inCandidate(e, p.grid, pick);
    }
    let sum = 0;
    let defined = 0;
    truths.forEach((truth, i) => {
      const v = metric.value(scored(truth, fits[i].proba, k, d.positive));
      if (v === null) return;
      sum += v;
      defined++;
    });
    return defined === 0 ? null : sum / defined;
  });
  return { scores, chosen: choose(scores, metric.better, p.grid, p.tune.prefer, all, p.tune.metric) };
}

/** Fits one candidate's inner cross-validation makes (k folds × repeats, or one per repeat for holdout). */
export function innerFits(split: TuneSettings['split']): number {
  return (splitRules[split.rule].tests === 'fold-1' ? 1 : split.folds) * split.repeats;
}

/** The best score; among equal scores, the candidate that comes first in the `prefer` order. */
export function choose(
  scores: readonly (number | null)[],
  better: 'higher' | 'lower',
  grid: readonly TunedSetting[],
  prefer: TuneSettings['prefer'],
  all: readonly Int32Array[],
  metricName: string,
): number {
  const rank = prefer.map((q) => ({ at: grid.findIndex((g) => g.name === q.name), order: q.order }));
  const preferred = (i: number, j: number): boolean => {
    for (const { at, order } of rank) {
      const a = all[i][at];
      const b = all[j][at];
      if (a === b) continue;
      if (order === 'first-listed') return a < b;
      const va = grid[at].values[a] as number;
      const vb = grid[at].values[b] as number;
      return order === 'smallest' ? va < vb : va > vb;
    }
    return i < j;
  };
  let best = -1;
  scores.forEach((s, i) => {
    if (s === null) return;
    const b = best < 0 ? null : scores[best]!;
    if (b === null || (better === 'higher' ? s > b : s < b) || (s === b && preferred(i, best))) best = i;
  });
  if (best < 0)
    throw new FitError(
      'tuning-metric-undefined',
      `${metricName} is undefined in every inner fold for every candidate, so no candidate can be chosen`,
      'tune by a metric defined on these inner test parts (e.g. accuracy), or use more inner rows per fold',
    );
  return best;
}

/** A tuned fold: the search on its training rows, then the winner fitted on them and the test rows predicted. */
export function nestedFold(
  p: TunedParts,
  d: SearchData,
  job: { repeat: number; fold: number; train: Int32Array; test: Int32Array },
  run: InnerRunner,
): FoldFit {
  const search = searchGrid(p, d, job.train, { repeat: job.repeat, fold: job.fold }, run);
  const pick = candidates(p.grid)[search.chosen];
  try {
    return { ...fitFold(partsFor(p, pick), d, job.train, job.test), search };
  } catch (e) {
    throw inCandidate(e, p.grid, pick);
  }
}

function inCandidate(e: unknown, grid: readonly TunedSetting[], pick: Int32Array): unknown {
  if (!(e instanceof FitError)) return e;
  const values = Object.entries(valuesOf(grid, pick))
    .map(([name, v]) => `${name} = ${v}`)
    .join(', ');
  return new FitError(e.code, `${e.message} (tuning candidate ${values})`, e.hint);
}

/** Rows, ids and labels the inner split of an outer fold sees (spec §9), the rows in id order. */
function innerInput(d: Pick<SearchData, 'ids' | 'y' | 'classes' | 'groups'>, train: Int32Array) {
  return {
    ids: Array.from(train, (r) => d.ids[r]),
    y: takeInt(d.y, train),
    classCount: d.classes.length,
    groups: d.groups && Array.from(train, (r) => d.groups![r]),
  };
}

/**
 * Every outer fold's inner assignment as CSV: `outer-repeat,outer-fold,id,repeat,fold`, by outer
 * repeat, outer fold, inner repeat, then id byte order — what an outside tool needs to rerun the search.
 */
export function innerAssignmentsCsv(
  split: TuneSettings['split'],
  d: Pick<SearchData, 'ids' | 'y' | 'classes' | 'groups'>,
  plans: readonly { repeat: number; fold: number; train: Int32Array }[],
): string {
  const lines = ['outer-repeat,outer-fold,id,repeat,fold'];
  for (const plan of plans) {
    const input = innerInput(d, plan.train);
    const inner = assignFolds(input, split, { repeat: plan.repeat, fold: plan.fold });
    const quoted = csvCells(input.ids);
    const n = input.ids.length;
    for (let r = 1; r <= inner.repeats; r++)
      for (let i = 0; i < n; i++) lines.push(`${plan.repeat},${plan.fold},${quoted[i]},${r},${inner.fold[(r - 1) * n + i]}`);
  }
  return lines.join('\n') + '\n';
}
