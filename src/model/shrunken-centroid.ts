/**
 * Nearest shrunken centroids (Tibshirani, Hastie, Narasimhan & Chu 2002, PNAS 99:6567):
 * class centroids are pulled toward the overall centroid by soft-thresholding their
 * standardized differences by Δ = `shrink`; a row's class scores are the discriminant
 * δ_k(x) = Σ_j (x_j − x̄'_kj)² / (s_j + s0)² − 2 log π_k, and probabilities ∝ exp(−δ_k / 2).
 * shrink = 0 gives plain nearest (standardized) centroids.
 */
import { classMoments, overallMoments } from './class-moments.js';
import { noChecks, FitError, softmaxRows, type ModelCapabilities, type ModelImpl } from './types.js';

export interface ShrunkenCentroidParams {
  centroid: (number[] | null)[]; // shrunken centroid per class
  scale: number[]; // s_j + s0
  logPrior: (number | null)[];
}

const fromMoments: NonNullable<ModelCapabilities<ShrunkenCentroidParams>['fromMoments']> = (moments, options, { classCount }) => {
  const shrink = options.shrink as number;
  const { cols, n, mean } = moments;
  const { rows, mean: overall } = overallMoments(moments);
  const present = Array.from(n).filter((c) => c > 0).length;
  if (rows - present < 1) throw new FitError('too-few-rows', 'shrunken-centroid needs more training rows than classes');
  const within = new Float64Array(cols);
  for (let c = 0; c < classCount; c++) for (let j = 0; j < cols; j++) within[j] += moments.m2[c * cols + j];
  const s = Array.from(within, (w) => Math.sqrt(w / (rows - present)));
  const s0 = median(s);
  const scale = s.map((v) => v + s0);
  if (scale.some((v) => v === 0))
    throw new FitError('constant-features', 'shrunken-centroid: every feature is constant within classes in this training part');
  const centroid: (number[] | null)[] = [];
  const logPrior: (number | null)[] = [];
  for (let c = 0; c < classCount; c++) {
    if (n[c] === 0) {
      centroid.push(null);
      logPrior.push(null);
      continue;
    }
    const m = Math.sqrt(1 / n[c] - 1 / rows);
    const row: number[] = [];
    for (let j = 0; j < cols; j++) {
      const d = (mean[c * cols + j] - overall[j]) / (m * scale[j]);
      const shrunk = Math.sign(d) * Math.max(Math.abs(d) - shrink, 0);
      row.push(overall[j] + m * scale[j] * shrunk);
    }
    centroid.push(row);
    logPrior.push(Math.log(n[c] / rows));
  }
  return { centroid, scale, logPrior };
};

export const shrunkenCentroid: ModelImpl<ShrunkenCentroidParams> = {
  description: 'Nearest shrunken centroids (Tibshirani et al. 2002, PNAS 99:6567).',
  methods: (o) => `a nearest shrunken centroid classifier (shrinkage ${o.shrink})`,
  options: {
    shrink: {
      description: 'Soft-threshold Δ applied to the standardized centroid differences; 0 gives plain nearest centroids.',
      type: 'number',
      minimum: 0,
      default: 0,
    },
  },

  check: noChecks,
  fit: (X, y, options, ctx) => fromMoments(classMoments(X, y, ctx.classCount), options, ctx),
  capabilities: { fromMoments },
  predict(p, X) {
    const k = p.centroid.length;
    const { rows, cols, data } = X;
    const inv2 = Float64Array.from(p.scale, (v) => 1 / (v * v));
    const scores = new Float64Array(rows * k);
    for (let c = 0; c < k; c++) {
      const cen = p.centroid[c];
      const lp = p.logPrior[c];
      for (let r = 0; r < rows; r++) {
        if (cen === null || lp === null) {
          scores[r * k + c] = -Infinity;
          continue;
        }
        let q = 0;
        for (let j = 0; j < cols; j++) {
          const d = data[r * cols + j] - cen[j];
          q += d * d * inv2[j];
        }
        scores[r * k + c] = -0.5 * (q - 2 * lp);
      }
    }
    return softmaxRows(scores, rows, k);
  },
};

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 ? s[h] : (s[h - 1] + s[h]) / 2;
}
