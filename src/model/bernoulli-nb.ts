/** Bernoulli naive Bayes: a value above `threshold` counts as present; presence rates smoothed additively. */
import { classCounts, softmaxRows, type ModelImpl } from './types.js';

export interface BernoulliNbParams {
  threshold: number;
  logPrior: (number | null)[];
  logP: number[][]; // log P(present | class)
  logQ: number[][]; // log P(absent | class)
}

export const bernoulliNb: ModelImpl<BernoulliNbParams> = {
  fit(X, y, options, { classCount }) {
    const alpha = (options.smoothing as number | undefined) ?? 1;
    const threshold = (options.threshold as number | undefined) ?? 0;
    const { rows, cols, data } = X;
    const n = classCounts(y, classCount);
    const present = new Float64Array(classCount * cols);
    for (let r = 0; r < rows; r++) {
      const o = y[r] * cols;
      for (let j = 0; j < cols; j++) if (data[r * cols + j] > threshold) present[o + j]++;
    }
    const logP: number[][] = [];
    const logQ: number[][] = [];
    const logPrior: (number | null)[] = [];
    for (let c = 0; c < classCount; c++) {
      const rate = Array.from(present.subarray(c * cols, (c + 1) * cols), (v) => (v + alpha) / (n[c] + 2 * alpha));
      logP.push(rate.map(Math.log));
      logQ.push(rate.map((q) => Math.log(1 - q)));
      logPrior.push(n[c] > 0 ? Math.log(n[c] / rows) : null);
    }
    return { threshold, logPrior, logP, logQ };
  },
  predict(p, X) {
    const k = p.logPrior.length;
    const { rows, cols, data } = X;
    const scores = new Float64Array(rows * k);
    for (let c = 0; c < k; c++) {
      const lp = p.logPrior[c];
      const a = Float64Array.from(p.logP[c]);
      const b = Float64Array.from(p.logQ[c]);
      for (let r = 0; r < rows; r++) {
        if (lp === null) { scores[r * k + c] = -Infinity; continue; }
        let s = lp;
        for (let j = 0; j < cols; j++) s += data[r * cols + j] > p.threshold ? a[j] : b[j];
        scores[r * k + c] = s;
      }
    }
    return softmaxRows(scores, rows, k);
  },
};
