/** Bernoulli naive Bayes: a value above `threshold` counts as present; presence rates smoothed additively. */
import { noChecks, classCounts, naiveBayesPosteriors, type ModelImpl } from './types.js';

export interface BernoulliNbParams {
  threshold: number;
  logPrior: (number | null)[];
  logP: number[][]; // log P(present | class)
  logQ: number[][]; // log P(absent | class)
}

export const bernoulliNb: ModelImpl<BernoulliNbParams> = {
  description: 'Bernoulli naive Bayes on presence (value above a threshold) and absence.',
  methods: (o) => `a Bernoulli naive Bayes classifier (presence above ${o.threshold}, smoothing ${o.smoothing})`,
  options: {
    smoothing: {
      description: 'Additive smoothing of the per-class presence counts.',
      type: 'number',
      exclusiveMinimum: 0,
      default: 1,
    },
    threshold: {
      description: 'A value above this counts as present.',
      type: 'number',
      default: 0,
    },
  },

  check: noChecks,
  fit(X, y, options, { classCount }) {
    const alpha = options.smoothing as number;
    const threshold = options.threshold as number;
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
    const { rows, cols, data } = X;
    const logP = p.logP.map((row) => Float64Array.from(row));
    const logQ = p.logQ.map((row) => Float64Array.from(row));
    return naiveBayesPosteriors(rows, p.logPrior, (r, c, start) => {
      const a = logP[c];
      const b = logQ[c];
      let s = start;
      for (let j = 0; j < cols; j++) s += data[r * cols + j] > p.threshold ? a[j] : b[j];
      return s;
    });
  },
};
