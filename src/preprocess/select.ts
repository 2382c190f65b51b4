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
import type { StepProblem, TransformImpl } from './types.js';

export interface SelectParams {
  keep: number[];
  scores: (number | null)[];
}
export interface SelectStep {
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

export const select: TransformImpl<SelectParams, SelectStep> = {
  description: 'keep the `top` features by a score computed on the training part.',
  methods: (s) =>
    `the ${s.top} features with the highest ${s.by === 'variance' ? 'variance' : `${s.by === 't-test' ? 'absolute Welch t' : 'ANOVA F'} statistic`} in the training part were kept`,
  settings: {
    top: { description: 'Number of features kept.', type: 'integer', minimum: 1 },
    by: {
      description: 't-test: absolute Welch t (two classes only); f-test: one-way ANOVA F; variance: training variance.',
      enum: ['t-test', 'f-test', 'variance'],
    },
  },
  fillsMissing: false,
  check(step, ctx) {
    const problems: StepProblem[] = [];
    if (step.top > ctx.width)
      problems.push({
        severity: 'error',
        code: 'select-too-many',
        message: `select keeps the top ${step.top} features but only ${ctx.width} are there`,
        path: ['top'],
      });
    if (step.by === 't-test' && ctx.classCount !== 2)
      problems.push({
        severity: 'error',
        code: 't-test-needs-two-classes',
        message: `the t-test score needs exactly 2 classes; the label has ${ctx.classCount}`,
        path: ['by'],
        hint: 'use by: f-test for more classes',
      });
    // Standardized columns all have variance 1: the "top" ones would differ only by rounding.
    if (step.by === 'variance' && ctx.before.some((earlier) => earlier.step === 'standardize'))
      problems.push({
        severity: 'warning',
        code: 'variance-after-standardize',
        message:
          'select by variance comes after standardize, where every column has variance 1: which columns it keeps is decided by rounding',
        path: ['by'],
        hint: 'select by variance before standardize, or by t-test or f-test',
      });
    return { problems, width: Math.min(ctx.width, step.top) };
  },
  fit: (X, y, classCount, step) => fromScores(featureScores(X, y, classCount, step.by), step),
  apply(p, X) {
    return takeCols(X, Int32Array.from(p.keep));
  },
  fast: {
    kind: 'selection',
    kept: (p) => p.keep,
    fromScores,
    scoreColumn: (v, n, y, classCount, step, work) => scoreColumn(v, n, y, classCount, step.by, work),
    moments: {
      fit: (m, step) => fromScores(momentScores(m, step.by), step),
      after: (p, m) => restrictMoments(m, p.keep),
    },
  },
};
