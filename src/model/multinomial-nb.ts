/** Multinomial naive Bayes on non-negative counts with additive smoothing (default 1). */
import { noChecks, FitError, classCounts, naiveBayesPosteriors, type ModelImpl } from './types.js';

export interface MultinomialNbParams {
  logPrior: (number | null)[];
  logProb: number[][]; // [class][feature]
}

export const multinomialNb: ModelImpl<MultinomialNbParams> = {
  description: 'Multinomial naive Bayes for non-negative counts, with additive smoothing.',
  methods: (o) => `a multinomial naive Bayes classifier (additive smoothing ${o.smoothing})`,
  options: {
    smoothing: {
      description: 'Additive (Lidstone) smoothing added to every feature count.',
      type: 'number',
      exclusiveMinimum: 0,
      default: 1,
    },
  },

  check: noChecks,
  fit(X, y, options, { classCount }) {
    const alpha = options.smoothing as number;
    const { rows, cols, data } = X;
    for (let k = 0; k < data.length; k++)
      if (data[k] < 0)
        throw new FitError(
          'negative-counts',
          `multinomial-nb needs non-negative counts; feature ${(k % cols) + 1} has ${data[k]}`,
          'use gaussian-nb for measurements, or drop standardize before multinomial-nb',
        );
    const n = classCounts(y, classCount);
    const count = new Float64Array(classCount * cols);
    for (let r = 0; r < rows; r++) {
      const o = y[r] * cols;
      for (let j = 0; j < cols; j++) count[o + j] += data[r * cols + j];
    }
    const logProb: number[][] = [];
    const logPrior: (number | null)[] = [];
    for (let c = 0; c < classCount; c++) {
      let total = 0;
      for (let j = 0; j < cols; j++) total += count[c * cols + j] + alpha;
      logProb.push(Array.from(count.subarray(c * cols, (c + 1) * cols), (v) => Math.log(v + alpha) - Math.log(total)));
      logPrior.push(n[c] > 0 ? Math.log(n[c] / rows) : null);
    }
    return { logPrior, logProb };
  },
  predict(p, X) {
    const { rows, cols, data } = X;
    const logProb = p.logProb.map((row) => Float64Array.from(row));
    return naiveBayesPosteriors(rows, p.logPrior, (r, c, start) => {
      const w = logProb[c];
      let s = start;
      for (let j = 0; j < cols; j++) s += data[r * cols + j] * w[j];
      return s;
    });
  },
};
