/**
 * k nearest neighbours, Euclidean distance; probabilities are the neighbours' class shares.
 * Training rows arrive in the split spec's id order, so equal distances are broken by id order.
 */
import type { ModelImpl } from './types.js';

/** Training rows whose distances are computed before they are offered to the heap. */
const BLOCK = 256;

export interface KnnParams {
  k: number;
  classCount: number;
  X: number[][]; // training rows
  y: number[];
}

export const knn: ModelImpl<KnnParams> = {
  description: "k nearest neighbours by Euclidean distance; ties broken by the split spec's id order.",
  methods: (o) => `a k-nearest-neighbour classifier (k = ${o.k}, Euclidean distance)`,
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
    const k = Math.min(p.k, n);
    // The k nearest so far as a max-heap on (distance, training position): a row enters only when it
    // is nearer than the farthest kept, so most rows cost one comparison (no sort of all n rows).
    // Rows come in id order and a later row never displaces an equally distant earlier one, so the
    // neighbours are exactly the first k of the (distance, id order) ranking, as a full sort gives.
    const heapD = new Float64Array(k);
    const heapI = new Int32Array(k);
    const farther = (a: number, b: number) => heapD[a] > heapD[b] || (heapD[a] === heapD[b] && heapI[a] > heapI[b]);
    const swap = (a: number, b: number) => {
      const d = heapD[a];
      heapD[a] = heapD[b];
      heapD[b] = d;
      const i = heapI[a];
      heapI[a] = heapI[b];
      heapI[b] = i;
    };
    let size = 0;
    const offer = (s: number, i: number) => {
      if (size < k) {
        heapD[size] = s;
        heapI[size] = i;
        for (let c = size++; c > 0 && farther(c, (c - 1) >> 1); c = (c - 1) >> 1) swap(c, (c - 1) >> 1);
      } else if (s < heapD[0]) {
        heapD[0] = s;
        heapI[0] = i;
        for (let c = 0; ; ) {
          const left = 2 * c + 1;
          if (left >= k) break;
          const child = left + 1 < k && farther(left + 1, left) ? left + 1 : left;
          if (!farther(child, c)) break;
          swap(c, child);
          c = child;
        }
      }
    };
    const dist = new Float64Array(BLOCK);
    for (let r = 0; r < X.rows; r++) {
      const b = r * cols;
      size = 0;
      // Distances to a block of training rows at a time, the test row's values held while four rows are summed.
      for (let i0 = 0; i0 < n; i0 += BLOCK) {
        const len = Math.min(BLOCK, n - i0);
        let t = 0;
        for (; t + 4 <= len; t += 4) {
          const o0 = (i0 + t) * cols;
          const o1 = o0 + cols;
          const o2 = o1 + cols;
          const o3 = o2 + cols;
          let s0 = 0;
          let s1 = 0;
          let s2 = 0;
          let s3 = 0;
          for (let j = 0; j < cols; j++) {
            const x = X.data[b + j];
            const d0 = x - train[o0 + j];
            const d1 = x - train[o1 + j];
            const d2 = x - train[o2 + j];
            const d3 = x - train[o3 + j];
            s0 += d0 * d0;
            s1 += d1 * d1;
            s2 += d2 * d2;
            s3 += d3 * d3;
          }
          dist[t] = s0;
          dist[t + 1] = s1;
          dist[t + 2] = s2;
          dist[t + 3] = s3;
        }
        for (; t < len; t++) {
          const o = (i0 + t) * cols;
          let s = 0;
          for (let j = 0; j < cols; j++) {
            const d = X.data[b + j] - train[o + j];
            s += d * d;
          }
          dist[t] = s;
        }
        for (let t2 = 0; t2 < len; t2++) offer(dist[t2], i0 + t2);
      }
      // Each class's share is 1/k added once per neighbour of that class: the same sum whatever the order.
      for (let t = 0; t < k; t++) out[r * p.classCount + p.y[heapI[t]]] += 1 / p.k;
    }
    return out;
  },
};
