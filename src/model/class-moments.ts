/**
 * Per-class counts, means and sums of squared deviations (M2) of every feature: all that
 * Gaussian naive Bayes and shrunken centroids learn from their training rows. Moments of
 * disjoint parts combine exactly (Chan, Golub & LeVeque 1979, "Updating formulae and a
 * pairwise algorithm for computing sample variances"), so the runner summarizes each fold once
 * and fits every fold's model from the other folds' moments, instead of passing over the
 * training rows once per fold.
 */
import type { Matrix } from '../table/matrix.js';

export interface ClassMoments {
  classCount: number;
  cols: number;
  /** Rows per class. */
  n: Float64Array;
  /** [class * cols + feature] */
  mean: Float64Array;
  m2: Float64Array;
}

/** Two-pass moments (means first, then squared deviations from them) of every row, in order. */
export function classMoments(X: Matrix, y: Int32Array, classCount: number): ClassMoments {
  const inOrder = new Int32Array(X.rows);
  for (let r = 0; r < X.rows; r++) inOrder[r] = r;
  return partMoments(X, y, classCount, new Int32Array(X.rows).fill(1), 1, inOrder)[0];
}

/**
 * Two-pass class moments of every fold's rows at once: fold[row] (1-based) names each row's
 * part, and rows are visited in `order`. Each part's sums see its rows in that order, so the
 * result equals the moments of part g's rows alone, taken in that order, bit for bit, in two
 * passes over the table instead of two per part.
 */
export function partMoments(
  X: Matrix,
  y: Int32Array,
  classCount: number,
  fold: Int32Array,
  parts: number,
  order: Int32Array,
): ClassMoments[] {
  const { cols, data } = X;
  const stride = classCount * cols;
  const n = new Float64Array(parts * classCount);
  const sum = new Float64Array(parts * stride);
  for (let i = 0; i < order.length; i++) {
    const r = order[i];
    const g = fold[r] - 1;
    const o = g * stride + y[r] * cols;
    const b = r * cols;
    n[g * classCount + y[r]]++;
    for (let j = 0; j < cols; j++) sum[o + j] += data[b + j];
  }
  const mean = new Float64Array(parts * stride);
  for (let g = 0; g < parts; g++) {
    for (let c = 0; c < classCount; c++) {
      const count = n[g * classCount + c];
      const o = g * stride + c * cols;
      for (let j = 0; j < cols; j++) mean[o + j] = count > 0 ? sum[o + j] / count : 0;
    }
  }
  const m2 = new Float64Array(parts * stride);
  for (let i = 0; i < order.length; i++) {
    const r = order[i];
    const o = (fold[r] - 1) * stride + y[r] * cols;
    const b = r * cols;
    for (let j = 0; j < cols; j++) {
      const d = data[b + j] - mean[o + j];
      m2[o + j] += d * d;
    }
  }
  return Array.from({ length: parts }, (_, g) => ({
    classCount,
    cols,
    n: n.slice(g * classCount, (g + 1) * classCount),
    mean: mean.slice(g * stride, (g + 1) * stride),
    m2: m2.slice(g * stride, (g + 1) * stride),
  }));
}

/** Moments of the union of two disjoint parts. */
export function mergeMoments(a: ClassMoments, b: ClassMoments): ClassMoments {
  const { classCount, cols } = a;
  const n = new Float64Array(classCount);
  const mean = new Float64Array(classCount * cols);
  const m2 = new Float64Array(classCount * cols);
  for (let c = 0; c < classCount; c++) {
    const na = a.n[c];
    const nb = b.n[c];
    const total = na + nb;
    n[c] = total;
    const o = c * cols;
    if (nb === 0 || na === 0) {
      const from = nb === 0 ? a : b;
      mean.set(from.mean.subarray(o, o + cols), o);
      m2.set(from.m2.subarray(o, o + cols), o);
      continue;
    }
    for (let j = 0; j < cols; j++) {
      const delta = b.mean[o + j] - a.mean[o + j];
      mean[o + j] = a.mean[o + j] + (delta * nb) / total;
      m2[o + j] = a.m2[o + j] + b.m2[o + j] + (delta * delta * na * nb) / total;
    }
  }
  return { classCount, cols, n, mean, m2 };
}

/** Rows in all, and each feature's mean and total sum of squares (within + between classes). */
export function overallMoments(m: ClassMoments): { rows: number; mean: Float64Array; ss: Float64Array } {
  const { classCount, cols } = m;
  let rows = 0;
  for (let c = 0; c < classCount; c++) rows += m.n[c];
  const mean = new Float64Array(cols);
  const ss = new Float64Array(cols);
  for (let j = 0; j < cols; j++) {
    let total = 0;
    for (let c = 0; c < classCount; c++) total += m.n[c] * m.mean[c * cols + j];
    mean[j] = total / rows;
    let spread = 0;
    for (let c = 0; c < classCount; c++) {
      if (m.n[c] === 0) continue;
      const d = m.mean[c * cols + j] - mean[j];
      spread += m.m2[c * cols + j] + m.n[c] * d * d;
    }
    ss[j] = spread;
  }
  return { rows, mean, ss };
}

/** The moments of the listed features only, in that order. */
export function restrictMoments(m: ClassMoments, features: readonly number[]): ClassMoments {
  const { classCount } = m;
  const cols = features.length;
  const mean = new Float64Array(classCount * cols);
  const m2 = new Float64Array(classCount * cols);
  for (let c = 0; c < classCount; c++) {
    features.forEach((j, q) => {
      mean[c * cols + q] = m.mean[c * m.cols + j];
      m2[c * cols + q] = m.m2[c * m.cols + j];
    });
  }
  return { classCount, cols, n: m.n, mean, m2 };
}
