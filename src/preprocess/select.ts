/**
 * Keep the `top` features by a score computed on the training part only (fitting selection
 * inside the folds avoids the selection bias of Ambroise & McLachlan 2002, PNAS 99:6562).
 * Scores: |Welch t| (two classes), one-way ANOVA F, or variance. Higher is better; an
 * undefined score (NaN: a constant feature) ranks last, an infinite one (no spread within
 * classes) first; equal scores keep the earlier column.
 */
import { takeCols } from '../table/matrix.js';
import { restrictMoments } from '../model/class-moments.js';
import { featureScores, momentScores, scoreColumn, type ScoreBy } from './feature-scores.js';
import type { TransformImpl } from './types.js';

export interface SelectParams {
  keep: number[];
  scores: (number | null)[];
}
interface SelectStep {
  top: number;
  by: ScoreBy;
}

/** Positions of the `top` highest scores (undefined scores last, ties to the earlier position), ascending. */
export function topIndices(scores: Float64Array, top: number): number[] {
  // NaN (a constant feature) ranks last; +Infinity (a perfectly separating one) ranks first.
  const value = (j: number) => (scores[j] === scores[j] ? scores[j] : -Infinity);
  // A sorted shortlist (best first) with binary insertion: O(n log top) instead of sorting all n.
  const best: number[] = [];
  const better = (a: number, b: number) => value(a) > value(b) || (value(a) === value(b) && a < b);
  for (let j = 0; j < scores.length; j++) {
    if (best.length === top && !better(j, best[top - 1])) continue;
    let lo = 0;
    let hi = best.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (better(best[mid], j)) lo = mid + 1;
      else hi = mid;
    }
    best.splice(lo, 0, j);
    if (best.length > top) best.pop();
  }
  return best.sort((a, b) => a - b);
}

const fromScores = (scores: Float64Array, step: SelectStep): SelectParams => ({
  keep: topIndices(scores, step.top),
  scores: Array.from(scores, (s) => (Number.isFinite(s) ? s : null)),
});

export const select: TransformImpl<SelectParams> = {
  fit: (X, y, classCount, step: SelectStep) => fromScores(featureScores(X, y, classCount, step.by), step),
  moments: {
    fit: (m, step: SelectStep) => fromScores(momentScores(m, step.by), step),
    after: (p, m) => restrictMoments(m, p.keep),
  },
  scoreColumn: (v, n, y, classCount, step: SelectStep, counts, mean, ss, present) =>
    scoreColumn(v, n, y, classCount, step.by, counts, mean, ss, present),
  fromScores,
  apply(p, X) {
    return takeCols(X, Int32Array.from(p.keep));
  },
  kept(p) {
    return p.keep;
  },
  columns(p, names) {
    return p.keep.map((j) => names[j]);
  },
};
