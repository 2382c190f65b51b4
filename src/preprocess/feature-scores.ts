/**
 * Per-feature scores of the selection step on training rows: |Welch t| (two classes), one-way
 * ANOVA F, or variance. Two forms with the same arithmetic per column, summing rows in the same
 * order: over a whole row-major matrix, and over one column's values at a time (by-columns.ts).
 */
import { overallMoments, type ClassMoments } from '../model/class-moments.js';
import type { Matrix } from '../table/matrix.js';
import type { ScoreWork } from './types.js';

export type ScoreBy = 't-test' | 'f-test' | 'variance';

export function featureScores(X: Matrix, y: Int32Array, classCount: number, by: ScoreBy): Float64Array {
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
    for (let j = 0; j < cols; j++) {
      const d = data[b + j] - mean[o + j];
      ss[o + j] += d * d;
    }
  }
  const present = presentClasses(n);
  const out = new Float64Array(cols);
  for (let j = 0; j < cols; j++) out[j] = scoreOf(by, present, n, mean, ss, j, cols, overall[j], rows);
  return out;
}

/** The same scores from class moments (means and within-class sums of squares) of the training rows. */
export function momentScores(m: ClassMoments, by: ScoreBy): Float64Array {
  const { cols } = m;
  const { rows, mean: overall } = overallMoments(m);
  const present = presentClasses(m.n);
  const out = new Float64Array(cols);
  for (let j = 0; j < cols; j++) out[j] = scoreOf(by, present, m.n, m.mean, m.m2, j, cols, overall[j], rows);
  return out;
}

/** Class codes with at least one training row, ascending. */
export function presentClasses(n: Float64Array): number[] {
  return Array.from(n.keys()).filter((c) => n[c] > 0);
}

/**
 * One column's score from its values v[0, rows). `work.counts` are the rows per class; its `mean`
 * and `ss` are scratch space of classCount numbers each (reused across columns: no allocation).
 */
export function scoreColumn(v: Float64Array, rows: number, y: Int32Array, classCount: number, by: ScoreBy, work: ScoreWork): number {
  const { counts, mean, ss, present } = work;
  mean.fill(0);
  ss.fill(0);
  for (let i = 0; i < rows; i++) mean[y[i]] += v[i];
  let overall = 0;
  for (let c = 0; c < classCount; c++) {
    overall += mean[c];
    if (counts[c] > 0) mean[c] /= counts[c];
  }
  overall /= rows;
  for (let i = 0; i < rows; i++) {
    const d = v[i] - mean[y[i]];
    ss[y[i]] += d * d;
  }
  return scoreOf(by, present, counts, mean, ss, 0, 1, overall, rows);
}

/** The score of column j from class statistics stored at [class * stride + j]. */
function scoreOf(
  by: ScoreBy,
  present: readonly number[],
  n: Float64Array,
  mean: Float64Array,
  ss: Float64Array,
  j: number,
  stride: number,
  overall: number,
  rows: number,
): number {
  let within = 0;
  let between = 0;
  for (const c of present) {
    within += ss[c * stride + j];
    const d = mean[c * stride + j] - overall;
    between += n[c] * d * d;
  }
  if (by === 'variance') return (within + between) / rows;
  if (by === 't-test') {
    const [a, b] = present;
    const va = ss[a * stride + j] / (n[a] - 1) / n[a];
    const vb = ss[b * stride + j] / (n[b] - 1) / n[b];
    return Math.abs(mean[a * stride + j] - mean[b * stride + j]) / Math.sqrt(va + vb);
  }
  return between / (present.length - 1) / (within / (rows - present.length));
}
