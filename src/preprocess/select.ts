/**
 * Keep the `top` features by a score computed on the training part only (fitting selection
 * inside the folds avoids the selection bias of Ambroise & McLachlan 2002, PNAS 99:6562).
 * Scores: |Welch t| (two classes), one-way ANOVA F, or variance. Higher is better; an
 * undefined score (a constant feature) ranks last; equal scores keep the earlier column.
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

export const select: TransformImpl<SelectParams> = {
  fit(X, y, classCount, step: { top: number; by: 't-test' | 'f-test' | 'variance' }) {
    const scores = featureScores(X, y, classCount, step.by);
    const order = Array.from(scores.keys()).sort((a, b) => {
      const sa = Number.isFinite(scores[a]) ? scores[a] : -Infinity;
      const sb = Number.isFinite(scores[b]) ? scores[b] : -Infinity;
      return sb - sa || a - b;
    });
    const keep = order.slice(0, step.top).sort((a, b) => a - b);
    return { keep, scores: Array.from(scores, (s) => (Number.isFinite(s) ? s : null)) };
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
