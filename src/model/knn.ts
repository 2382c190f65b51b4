/**
 * k nearest neighbours, Euclidean distance; probabilities are the neighbours' class shares.
 * Training rows arrive in the split spec's id order, so equal distances are broken by id order.
 */
import type { ModelImpl } from './types.js';

export interface KnnParams {
  k: number;
  classCount: number;
  X: number[][]; // training rows
  y: number[];
}

export const knn: ModelImpl<KnnParams> = {
  description: "k nearest neighbours by Euclidean distance; ties broken by the split spec's id order.",
  options: {
    k: {
      description: 'Number of neighbours; at most the size of the smallest training part.',
      type: 'integer',
      minimum: 1,
      default: 5,
    },
  },
  check: (options, data) =>
    (options.k as number) > data.smallestTrain
      ? [
          {
            code: 'knn-k-too-large',
            message: `knn k is ${options.k} but the smallest training part has ${data.smallestTrain} rows`,
            path: ['k'],
          },
        ]
      : [],

  fit(X, y, options, { classCount }) {
    const k = options.k as number;
    const rows: number[][] = [];
    for (let r = 0; r < X.rows; r++) rows.push(Array.from(X.data.subarray(r * X.cols, (r + 1) * X.cols)));
    return { k, classCount, X: rows, y: Array.from(y) };
  },
  capabilities: {
    notes(p) {
      // Every training row the same: every distance ties, so the neighbours are simply the first k rows in id order.
      const first = p.X[0];
      const allSame = p.X.every((row) => row.every((v, j) => v === first[j]));
      return allSame && p.X.length > p.k
        ? [
            'every training row has the same feature values, so all distances tie and the k neighbours are the first k training ' +
              'rows in id order',
          ]
        : [];
    },
  },
  predict(p, X) {
    const n = p.y.length;
    const cols = X.cols;
    const train = new Float64Array(n * cols);
    p.X.forEach((row, i) => {
      train.set(row, i * cols);
    });
    const out = new Float64Array(X.rows * p.classCount);
    const dist = new Float64Array(n);
    const order = new Int32Array(n);
    for (let r = 0; r < X.rows; r++) {
      const b = r * cols;
      for (let i = 0; i < n; i++) {
        let s = 0;
        for (let j = 0; j < cols; j++) {
          const d = X.data[b + j] - train[i * cols + j];
          s += d * d;
        }
        dist[i] = s;
        order[i] = i;
      }
      order.sort((i, j) => dist[i] - dist[j] || i - j);
      for (let t = 0; t < p.k; t++) out[r * p.classCount + p.y[order[t]]] += 1 / p.k;
    }
    return out;
  },
};
