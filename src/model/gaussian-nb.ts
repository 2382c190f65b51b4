/**
 * Gaussian naive Bayes: per-class means and maximum-likelihood variances (divisor = class
 * count), every variance raised by floor × the largest feature variance of the training part
 * (common practice), posteriors computed in log space.
 */
import type { ModelImpl } from './types.js';
import { classCounts, softmaxRows } from './types.js';

export interface GaussianNbParams {
  logPrior: (number | null)[]; // null = class absent from training (probability 0)
  mean: number[][]; // [class][feature]
  variance: number[][];
}

export const gaussianNb: ModelImpl<GaussianNbParams> = {
  fit(X, y, options, { classCount }) {
    const { rows, cols, data } = X;
    const floor = (options['variance-floor'] as number | undefined) ?? 1e-9;
    const priors = options.priors as number[] | undefined; // already ordered by class code
    const n = classCounts(y, classCount);
    const sum = new Float64Array(classCount * cols);
    for (let r = 0; r < rows; r++) {
      const o = y[r] * cols;
      const b = r * cols;
      for (let j = 0; j < cols; j++) sum[o + j] += data[b + j];
    }
    const mean = new Float64Array(classCount * cols);
    for (let c = 0; c < classCount; c++) for (let j = 0; j < cols; j++) mean[c * cols + j] = n[c] > 0 ? sum[c * cols + j] / n[c] : 0;
    const ss = new Float64Array(classCount * cols);
    for (let r = 0; r < rows; r++) {
      const o = y[r] * cols;
      const b = r * cols;
      for (let j = 0; j < cols; j++) { const d = data[b + j] - mean[o + j]; ss[o + j] += d * d; }
    }
    // Largest feature variance of the training part, from the class statistics:
    // total sum of squares = within-class + between-class (saves two passes over the rows).
    let largest = 0;
    for (let j = 0; j < cols; j++) {
      let total = 0;
      for (let c = 0; c < classCount; c++) total += sum[c * cols + j];
      const overall = total / rows;
      let spread = 0;
      for (let c = 0; c < classCount; c++) {
        if (n[c] === 0) continue;
        const d = mean[c * cols + j] - overall;
        spread += ss[c * cols + j] + n[c] * d * d;
      }
      largest = Math.max(largest, spread / rows);
    }
    const epsilon = floor * largest;
    const logPrior: (number | null)[] = [];
    const meanOut: number[][] = [];
    const varOut: number[][] = [];
    for (let c = 0; c < classCount; c++) {
      const prior = priors ? priors[c] : n[c] / rows;
      logPrior.push(n[c] > 0 && prior > 0 ? Math.log(prior) : null);
      meanOut.push(Array.from(mean.subarray(c * cols, (c + 1) * cols)));
      varOut.push(Array.from(ss.subarray(c * cols, (c + 1) * cols), (s) => (n[c] > 0 ? s / n[c] : 0) + epsilon));
    }
    return { logPrior, mean: meanOut, variance: varOut };
  },

  predict(p, X) {
    const k = p.logPrior.length;
    const { rows, cols, data } = X;
    const scores = new Float64Array(rows * k);
    for (let c = 0; c < k; c++) {
      const lp = p.logPrior[c];
      if (lp === null) { for (let r = 0; r < rows; r++) scores[r * k + c] = -Infinity; continue; }
      const mean = Float64Array.from(p.mean[c]);
      const inv = Float64Array.from(p.variance[c], (v) => 1 / v);
      let logNorm = 0;
      for (let j = 0; j < cols; j++) logNorm += Math.log(2 * Math.PI * p.variance[c][j]);
      const base = lp - 0.5 * logNorm;
      for (let r = 0; r < rows; r++) {
        const b = r * cols;
        let q = 0;
        for (let j = 0; j < cols; j++) { const d = data[b + j] - mean[j]; q += d * d * inv[j]; }
        scores[r * k + c] = base - 0.5 * q;
      }
    }
    return softmaxRows(scores, rows, k);
  },
};
