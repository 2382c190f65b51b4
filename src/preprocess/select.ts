/**
 * Keep the `top` features by a score computed on the training part only (fitting selection
 * inside the folds avoids the selection bias of Ambroise & McLachlan 2002, PNAS 99:6562).
 * Scores: |Welch t| (two classes), one-way ANOVA F, or variance. Higher is better; an
 * undefined score (NaN: a constant feature) ranks last, an infinite one (no spread within
 * classes) first; equal scores keep the earlier column.
 */
import { takeCols } from '../table/matrix.js';
import type { TransformImpl } from './types.js';

export interface SelectParams { keep: number[]; scores: (number | null)[] }

export function featureScores(X: { rows: number; cols: number; data: Float64Array }, y: Int32Array, classCount: number, by: 't-test' | 'f-test' | 'variance'): Float64Array {
  const { rows, cols, data } = X;
  const n = new Float64Array(classCount);
  for (let r = 0; r < rows; r++) n[y[r]]++;
  const mean = new Float64Array(classCount * cols);
  for (let r = 0; r < rows; r++) {
    const o = y[r] * cols;
    const b = r * cols;
    for (let j = 0; j < cols; j++) mean[o + j] += data[b + j];
  }
  const overall = new Float64Array(cols);
  for (let c = 0; c < classCount; c++) {
    const o = c * cols;
    for (let j = 0; j < cols; j++) overall[j] += mean[o + j];
    if (n[c] > 0) for (let j = 0; j < cols; j++) mean[o + j] /= n[c];
  }
  for (let j = 0; j < cols; j++) overall[j] /= rows;
  // Within-class sums of squares (two-pass, around the class means).
  const ss = new Float64Array(classCount * cols);
  for (let r = 0; r < rows; r++) {
    const o = y[r] * cols;
    const b = r * cols;
    for (let j = 0; j < cols; j++) { const d = data[b + j] - mean[o + j]; ss[o + j] += d * d; }
  }
  const present = Array.from(n.keys()).filter((c) => n[c] > 0);
  const out = new Float64Array(cols);
  for (let j = 0; j < cols; j++) {
    let within = 0;
    let between = 0;
    for (const c of present) {
      within += ss[c * cols + j];
      const d = mean[c * cols + j] - overall[j];
      between += n[c] * d * d;
    }
    if (by === 'variance') out[j] = (within + between) / rows;
    else if (by === 't-test') {
      const [a, b] = present;
      const va = ss[a * cols + j] / (n[a] - 1) / n[a];
      const vb = ss[b * cols + j] / (n[b] - 1) / n[b];
      out[j] = Math.abs(mean[a * cols + j] - mean[b * cols + j]) / Math.sqrt(va + vb);
    } else out[j] = (between / (present.length - 1)) / (within / (rows - present.length));
  }
  return out;
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
    while (lo < hi) { const mid = (lo + hi) >> 1; if (better(best[mid], j)) lo = mid + 1; else hi = mid; }
    best.splice(lo, 0, j);
    if (best.length > top) best.pop();
  }
  return best.sort((a, b) => a - b);
}

export const select: TransformImpl<SelectParams> = {
  fit(X, y, classCount, step: { top: number; by: 't-test' | 'f-test' | 'variance' }) {
    const scores = featureScores(X, y, classCount, step.by);
    return { keep: topIndices(scores, step.top), scores: Array.from(scores, (s) => (Number.isFinite(s) ? s : null)) };
  },
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
