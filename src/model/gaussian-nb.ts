/**
 * Gaussian naive Bayes: per-class means and maximum-likelihood variances (divisor = class
 * count), every variance raised by floor × the largest feature variance of the training part
 * (common practice), posteriors computed in log space.
 */
import { classMoments, overallMoments } from './class-moments.js';
import type { Matrix } from '../table/matrix.js';
import { classKeyedProblems, type ModelCapabilities, type ModelImpl } from './types.js';
import { softmaxRows } from './types.js';

export interface GaussianNbParams {
  logPrior: (number | null)[]; // null = class absent from training (probability 0)
  mean: number[][]; // [class][feature]
  variance: number[][];
}

const fromMoments: NonNullable<ModelCapabilities<GaussianNbParams>['fromMoments']> = (m, options, { classCount }) => {
  const cols = m.cols;
  const floor = options['variance-floor'] as number;
  const priors = options.priors as number[] | undefined; // already ordered by class code
  const overall = overallMoments(m);
  const rows = overall.rows;
  let largest = 0;
  for (let j = 0; j < cols; j++) largest = Math.max(largest, overall.ss[j] / rows);
  const epsilon = floor * largest;
  const logPrior: (number | null)[] = [];
  const meanOut: number[][] = [];
  const varOut: number[][] = [];
  for (let c = 0; c < classCount; c++) {
    const nc = m.n[c];
    const prior = priors ? priors[c] : nc / rows;
    logPrior.push(nc > 0 && prior > 0 ? Math.log(prior) : null);
    meanOut.push(Array.from(m.mean.subarray(c * cols, (c + 1) * cols)));
    varOut.push(Array.from(m.m2.subarray(c * cols, (c + 1) * cols), (s) => (nc > 0 ? s / nc : 0) + epsilon));
  }
  return { logPrior, mean: meanOut, variance: varOut };
};

export const gaussianNb: ModelImpl<GaussianNbParams> = {
  description: 'Gaussian naive Bayes: per-class means and variances, posteriors in log space.',
  methods: () => 'a Gaussian naive Bayes classifier',
  options: {
    priors: {
      description: 'Class prior probabilities by class label; must cover every class and sum to 1. Default: training class shares.',
      type: 'object',
      additionalProperties: {
        type: 'number',
        minimum: 0,
        maximum: 1,
      },
    },
    'variance-floor': {
      description:
        'Added to every variance, as a multiple of the largest feature variance of the training part. When every feature is ' +
        'constant over the training part the variances stay 0; such features tell the classes nothing and are left out, so the ' +
        'class priors decide.',
      type: 'number',
      minimum: 0,
      default: 1e-9,
    },
  },
  check: (options, data) => (options.priors ? classKeyedProblems('priors', options.priors as Record<string, number>, data.classes, 1) : []),

  fit: (X, y, options, ctx) => fromMoments(classMoments(X, y, ctx.classCount), options, ctx),
  capabilities: { fromMoments, predictRows },

  predict: (p, X) => predictRows([p], X),
};

/** Rows which[i] (default: every row) scored by models[modelOf[i]] (default: the first). */
function predictRows(models: GaussianNbParams[], X: Matrix, which?: Int32Array, modelOf?: Int32Array): Float64Array {
  const k = models[0].logPrior.length;
  const { cols, data } = X;
  const rows = which ? which.length : X.rows;
  const scores = new Float64Array(rows * k);
  // Per model and class: means, inverse variances and the constant part of the log density,
  // at [(model * k + class) * cols + j].
  const mean = new Float64Array(models.length * k * cols);
  const inv = new Float64Array(models.length * k * cols);
  const base = new Float64Array(models.length * k);
  models.forEach((p, m) => {
    for (let c = 0; c < k; c++) {
      const lp = p.logPrior[c];
      const mc = m * k + c;
      if (lp === null) {
        base[mc] = -Infinity;
        continue;
      }
      let logNorm = 0;
      for (let j = 0; j < cols; j++) {
        mean[mc * cols + j] = p.mean[c][j];
        // A variance of exactly 0 remains only when every feature is constant over the training
        // part (the floor is a multiple of the largest variance): such a feature tells the
        // classes nothing and is left out of the likelihood, so the prior decides.
        if (p.variance[c][j] === 0) continue;
        inv[mc * cols + j] = 1 / p.variance[c][j];
        logNorm += Math.log(2 * Math.PI * p.variance[c][j]);
      }
      base[mc] = lp - 0.5 * logNorm;
    }
  });
  // Row by row, every class while the row is in cache (rows come in id order, scattered in memory).
  for (let r = 0; r < rows; r++) {
    const b = (which ? which[r] : r) * cols;
    const first = (modelOf ? modelOf[r] : 0) * k;
    for (let c = 0; c < k; c++) {
      const mc = first + c;
      if (base[mc] === -Infinity) {
        scores[r * k + c] = -Infinity;
        continue;
      }
      const o = mc * cols;
      let q = 0;
      for (let j = 0; j < cols; j++) {
        const d = data[b + j] - mean[o + j];
        q += d * d * inv[o + j];
      }
      scores[r * k + c] = base[mc] - 0.5 * q;
    }
  }
  return softmaxRows(scores, rows, k);
}
