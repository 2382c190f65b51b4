/**
 * k nearest neighbours, Euclidean distance; probabilities are the neighbours' class shares.
 * Training rows arrive in the split spec's id order, so equal distances are broken by id order.
 */
import type { ModelImpl } from './types.js';

/** Training rows in one chunk (kept in cache while a block of test rows is measured against it). */
const BLOCK = 256;
/** Test rows measured against each chunk of training rows. */
const TEST_BLOCK = 16;

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
    // Per test row, the k nearest so far as a max-heap on (distance, training position) at
    // heapD/heapI[q * k ..]: a row enters only when it is nearer than the farthest kept, so most
    // rows cost one comparison (no sort of all n rows). Rows come in id order and a later row never
    // displaces an equally distant earlier one, so the neighbours are exactly the first k of the
    // (distance, id order) ranking, as a full sort gives.
    const heapD = new Float64Array(TEST_BLOCK * k);
    const heapI = new Int32Array(TEST_BLOCK * k);
    const sizes = new Int32Array(TEST_BLOCK);
    const farther = (a: number, b: number) => heapD[a] > heapD[b] || (heapD[a] === heapD[b] && heapI[a] > heapI[b]);
    const swap = (a: number, b: number) => {
      const d = heapD[a];
      heapD[a] = heapD[b];
      heapD[b] = d;
      const i = heapI[a];
      heapI[a] = heapI[b];
      heapI[b] = i;
    };
    const offer = (q: number, s: number, i: number) => {
      const h = q * k;
      const size = sizes[q];
      if (size < k) {
        heapD[h + size] = s;
        heapI[h + size] = i;
        sizes[q] = size + 1;
        for (let c = size; c > 0 && farther(h + c, h + ((c - 1) >> 1)); c = (c - 1) >> 1) swap(h + c, h + ((c - 1) >> 1));
      } else {
        heapD[h] = s;
        heapI[h] = i;
        for (let c = 0; ; ) {
          const left = 2 * c + 1;
          if (left >= k) break;
          const child = left + 1 < k && farther(h + left + 1, h + left) ? left + 1 : left;
          if (!farther(h + child, h + c)) break;
          swap(h + c, h + child);
          c = child;
        }
      }
    };
    const data = X.data;
    const consider = (q: number, s: number, i: number) => {
      if (sizes[q] < k || s < heapD[q * k]) offer(q, s, i);
    };
    const limitOf = (q: number) => (sizes[q] < k ? Number.POSITIVE_INFINITY : heapD[q * k]);
    // One test row against one training row: the squared distance summed in column order.
    const single = (q: number, b: number, i: number) => {
      const o = i * cols;
      let s = 0;
      for (let j = 0; j < cols; j++) {
        const d = data[b + j] - train[o + j];
        s += d * d;
      }
      consider(q, s, i);
    };
    // A block of test rows against a chunk of training rows at a time, so the chunk stays in cache;
    // within it, two test rows against four training rows at once (eight independent sums, each
    // still in column order). Once both heaps are full, a tile whose eight partial sums all exceed
    // their row's farthest kept neighbour stops early: adding squares never makes a floating-point
    // sum smaller, so none of its full sums could enter.
    for (let r0 = 0; r0 < X.rows; r0 += TEST_BLOCK) {
      const tb = Math.min(TEST_BLOCK, X.rows - r0);
      sizes.fill(0);
      for (let i0 = 0; i0 < n; i0 += BLOCK) {
        const i1 = Math.min(n, i0 + BLOCK);
        let q = 0;
        for (; q + 2 <= tb; q += 2) {
          const a = (r0 + q) * cols;
          const b = a + cols;
          let i = i0;
          for (; i + 4 <= i1; i += 4) {
            const la = limitOf(q);
            const lb = limitOf(q + 1);
            const o0 = i * cols;
            const o1 = o0 + cols;
            const o2 = o1 + cols;
            const o3 = o2 + cols;
            let s0 = 0;
            let s1 = 0;
            let s2 = 0;
            let s3 = 0;
            let u0 = 0;
            let u1 = 0;
            let u2 = 0;
            let u3 = 0;
            let j = 0;
            for (; j < cols; j++) {
              const x = data[a + j];
              const y = data[b + j];
              const t0 = train[o0 + j];
              const t1 = train[o1 + j];
              const t2 = train[o2 + j];
              const t3 = train[o3 + j];
              let d = x - t0;
              s0 += d * d;
              d = x - t1;
              s1 += d * d;
              d = x - t2;
              s2 += d * d;
              d = x - t3;
              s3 += d * d;
              d = y - t0;
              u0 += d * d;
              d = y - t1;
              u1 += d * d;
              d = y - t2;
              u2 += d * d;
              d = y - t3;
              u3 += d * d;
              if ((j & 7) === 7 && s0 > la && s1 > la && s2 > la && s3 > la && u0 > lb && u1 > lb && u2 > lb && u3 > lb) break;
            }
            if (j < cols) continue;
            consider(q, s0, i);
            consider(q, s1, i + 1);
            consider(q, s2, i + 2);
            consider(q, s3, i + 3);
            consider(q + 1, u0, i);
            consider(q + 1, u1, i + 1);
            consider(q + 1, u2, i + 2);
            consider(q + 1, u3, i + 3);
          }
          for (; i < i1; i++) {
            single(q, a, i);
            single(q + 1, b, i);
          }
        }
        for (; q < tb; q++) for (let i = i0; i < i1; i++) single(q, (r0 + q) * cols, i);
      }
      // Each class's share is 1/k added once per neighbour of that class: the same sum whatever the order.
      for (let q = 0; q < tb; q++) for (let t = 0; t < k; t++) out[(r0 + q) * p.classCount + p.y[heapI[q * k + t]]] += 1 / p.k;
    }
    return out;
  },
};
