/**
 * The declared rule that turns k fold models into one prediction per new row. Pure.
 * - mean-probability: average of the fold models' class probabilities; predicted = most probable.
 * - majority-vote: each fold model votes its top class; the p_ columns are vote shares. An even
 *   split is resolved by `tie`: mean-probability (the tied class with the highest mean
 *   probability), class-order (the first tied class), or abstain (no prediction, row flagged).
 * - refit: the refit model's probabilities.
 * agreement = share of fold models whose top class equals the prediction.
 */
import { models } from '../model/registry.js';
import { predictedClasses } from '../metric/types.js';
import { applyPipeline } from '../preprocess/pipeline.js';
import type { ModelKind, ReconcileRule, TieRule } from '../protocol/types.js';
import type { Matrix } from '../table/matrix.js';
import type { SavedModel } from './models-file.js';

export interface Reconciled {
  /** Predicted class code per row, −1 when the vote tied and the rule abstains. */
  predicted: Int32Array;
  /** rows × classes: probabilities (or vote shares for majority-vote). */
  values: Float64Array;
  agreement: Float64Array;
  /** Top class of each fold model per row: top[m][r]. */
  top: Int32Array[];
  tied: Uint8Array;
}

/** Probabilities computed elsewhere (a command model's program, run by the shell): per fold model, and the refit model's. */
export interface GivenProbabilities {
  folds: Float64Array[];
  refit?: Float64Array;
}

export function foldProbabilities(kind: ModelKind, saved: readonly SavedModel[], X: Matrix): Float64Array[] {
  return saved.map((s) => models[kind].predict(s.model, applyPipeline(s.pipeline, X)));
}

export function reconcile(
  kind: ModelKind,
  folds: readonly SavedModel[],
  refit: SavedModel | null,
  X: Matrix,
  classCount: number,
  rule: ReconcileRule,
  tie: TieRule | null,
  given?: GivenProbabilities,
): Reconciled {
  const rows = X.rows;
  const k = classCount;
  const perModel = given?.folds ?? foldProbabilities(kind, folds, X);
  const top = perModel.map((p) => predictedClasses(p, k));
  const mean = new Float64Array(rows * k);
  for (const p of perModel) for (let i = 0; i < mean.length; i++) mean[i] += p[i];
  for (let i = 0; i < mean.length; i++) mean[i] /= perModel.length;
  const predicted = new Int32Array(rows);
  const tied = new Uint8Array(rows);
  let values: Float64Array = mean;
  if (rule === 'refit') {
    values = given?.refit ?? foldProbabilities(kind, [refit!], X)[0];
    predicted.set(predictedClasses(values, k));
  } else if (rule === 'mean-probability') {
    predicted.set(predictedClasses(mean, k));
  } else {
    values = new Float64Array(rows * k);
    for (const t of top) for (let r = 0; r < rows; r++) values[r * k + t[r]] += 1 / top.length;
    for (let r = 0; r < rows; r++) {
      let most = 0;
      for (let c = 0; c < k; c++) most = Math.max(most, count(top, r, c));
      const leaders: number[] = [];
      for (let c = 0; c < k; c++) if (count(top, r, c) === most) leaders.push(c);
      if (leaders.length === 1) {
        predicted[r] = leaders[0];
        continue;
      }
      tied[r] = 1;
      if (tie === 'abstain') predicted[r] = -1;
      else if (tie === 'class-order') predicted[r] = leaders[0];
      else predicted[r] = leaders.reduce((best, c) => (mean[r * k + c] > mean[r * k + best] ? c : best), leaders[0]);
    }
  }
  const agreement = new Float64Array(rows);
  for (let r = 0; r < rows; r++) {
    const target = predicted[r];
    let same = 0;
    let best = 0;
    for (let c = 0; c < k; c++) best = Math.max(best, count(top, r, c));
    for (const t of top) if (t[r] === target) same++;
    // An abstained row reports the largest vote share, so the report can show how split it was.
    agreement[r] = target === -1 ? best / top.length : same / top.length;
  }
  return { predicted, values, agreement, top, tied };
}

function count(top: readonly Int32Array[], r: number, c: number): number {
  let n = 0;
  for (const t of top) if (t[r] === c) n++;
  return n;
}

/** Whether a majority vote over `models` fold models and `classes` classes can end in a tie. */
export function tiePossible(modelCount: number, classes: number): boolean {
  return modelCount % 2 === 0 || classes > 2;
}
