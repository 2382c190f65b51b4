/**
 * k nearest neighbours, Euclidean distance; probabilities are the neighbours' class shares.
 * Training rows arrive in the split spec's id order, so equal distances are broken by id order.
 */
import { wasmBase64 } from './kernels/knn-distances.wasm.js';
import { instantiate, type Kernel, reserve } from './kernels/instance.js';
import type { Matrix } from '../table/matrix.js';
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
    // Plain arrays filled by index: Array.from over a typed array goes through its iterator, several times slower.
    const rows: number[][] = new Array(X.rows);
    for (let r = 0, o = 0; r < X.rows; r++) {
      const row: number[] = new Array(X.cols);
      for (let j = 0; j < X.cols; j++) row[j] = X.data[o++];
      rows[r] = row;
    }
    const labels: number[] = new Array(y.length);
    for (let i = 0; i < y.length; i++) labels[i] = y[i];
    return { k, classCount, X: rows, y: labels };
  },
  capabilities: {
    cheapFit: true,
    // Every test row against every training row: one fold of 20,000 × 30 took 0.35 s (6 M units).
    work: (rows, cols) => (rows * rows * cols) / 2000,
    keepsRows: {
      without: (p) => ({ k: p.k, classCount: p.classCount }),
      with: (rest, X, y) => knn.fit(X, y, { k: rest.k }, { classCount: rest.classCount as number }),
      rows: (p) => ({ X: packed(p), y: Int32Array.from(p.y) }),
    },
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
    const near = neighbours(p, X);
    const out = new Float64Array(X.rows * p.classCount);
    // Each class's share is 1/k added once per neighbour of that class: the same sum whatever the order.
    for (let r = 0; r < X.rows; r++) for (const i of near.of(r)) out[r * p.classCount + p.y[i]] += 1 / p.k;
    return out;
  },
};

/** The training rows in one row-major array (`cols` wide: a model of no rows has no row to tell). */
function packed(p: KnnParams, cols = p.X.length ? p.X[0].length : 0): Float64Array {
  const X = new Float64Array(p.X.length * cols);
  p.X.forEach((row, i) => {
    X.set(row, i * cols);
  });
  return X;
}

/**
 * The k nearest training rows of each test row (training positions, nearest first not
 * guaranteed), by the WebAssembly kernel when the rows fit its memory, else in plain JavaScript
 * (`plain`: always; the two give the same neighbours, test/model/knn-kernel.part.ts).
 */
export function neighbours(p: KnnParams, X: Matrix, plain = false): Nearest {
  const n = p.y.length;
  const cols = X.cols;
  const train = packed(p, cols);
  const near = nearest(X.rows, Math.min(p.k, n));
  if (plain || !wasmScan(near, X.data, X.rows, train, n, cols)) scalarScan(near, X.data, X.rows, train, n, cols);
  return near;
}

/**
 * The k nearest training rows of each test row, kept as a max-heap on (distance, training
 * position) per test row of the current block: a row enters only when it is nearer than the
 * farthest kept, so most rows cost one comparison (no sort of all n rows). Rows are offered in id
 * order and a later row never displaces an equally distant earlier one, so the neighbours are
 * exactly the first k of the (distance, id order) ranking, as a full sort gives.
 */
function nearest(rows: number, k: number) {
  const heapD = new Float64Array(TEST_BLOCK * k);
  const heapI = new Int32Array(TEST_BLOCK * k);
  const sizes = new Int32Array(TEST_BLOCK);
  const chosen = new Int32Array(rows * k);
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
  return {
    /** Offers training row i at squared distance s to test row q of the block. */
    consider(q: number, s: number, i: number) {
      if (sizes[q] < k || s < heapD[q * k]) offer(q, s, i);
    },
    /** Offers training rows first, first + 1, … at the squared distances dist[at], dist[at + 1], … (count of them) to test row q. */
    scan(q: number, dist: Float64Array, at: number, count: number, first: number) {
      const h = q * k;
      let i = 0;
      for (; i < count && sizes[q] < k; i++) offer(q, dist[at + i], first + i);
      let limit = heapD[h];
      for (; i < count; i++) {
        const s = dist[at + i];
        if (s < limit) {
          offer(q, s, first + i);
          limit = heapD[h];
        }
      }
    },
    full(q: number) {
      return sizes[q] === k;
    },
    /** The farthest kept distance of test row q of the block (Infinity until k are kept). */
    limit(q: number) {
      return sizes[q] < k ? Number.POSITIVE_INFINITY : heapD[q * k];
    },
    /** Keeps the neighbours of the block's tb rows (block starts at test row r0) and empties the heaps. */
    close(r0: number, tb: number) {
      for (let q = 0; q < tb; q++) chosen.set(heapI.subarray(q * k, q * k + k), (r0 + q) * k);
      sizes.fill(0);
    },
    of(r: number) {
      return chosen.subarray(r * k, r * k + k);
    },
  };
}

type Nearest = ReturnType<typeof nearest>;

/**
 * Every distance in plain JavaScript: a block of test rows against a chunk of training rows at a
 * time, so the chunk stays in cache; within it, two test rows against four training rows at once
 * (eight independent sums, each in column order). Once both heaps are full, a tile whose eight
 * partial sums all exceed their row's farthest kept neighbour stops early: adding squares never
 * makes a floating-point sum smaller, so none of its full sums could enter.
 */
function scalarScan(near: Nearest, data: Float64Array, rows: number, train: Float64Array, n: number, cols: number): void {
  // One test row against one training row: the squared distance summed in column order.
  const single = (q: number, b: number, i: number) => {
    const o = i * cols;
    let s = 0;
    for (let j = 0; j < cols; j++) {
      const d = data[b + j] - train[o + j];
      s += d * d;
    }
    near.consider(q, s, i);
  };
  for (let r0 = 0; r0 < rows; r0 += TEST_BLOCK) {
    const tb = Math.min(TEST_BLOCK, rows - r0);
    for (let i0 = 0; i0 < n; i0 += BLOCK) {
      const i1 = Math.min(n, i0 + BLOCK);
      let q = 0;
      for (; q + 2 <= tb; q += 2) {
        const a = (r0 + q) * cols;
        const b = a + cols;
        let i = i0;
        for (; i + 4 <= i1; i += 4) {
          const la = near.limit(q);
          const lb = near.limit(q + 1);
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
          near.consider(q, s0, i);
          near.consider(q, s1, i + 1);
          near.consider(q, s2, i + 2);
          near.consider(q, s3, i + 3);
          near.consider(q + 1, u0, i);
          near.consider(q + 1, u1, i + 1);
          near.consider(q + 1, u2, i + 2);
          near.consider(q + 1, u3, i + 3);
        }
        for (; i < i1; i++) {
          single(q, a, i);
          single(q + 1, b, i);
        }
      }
      for (; q < tb; q++) for (let i = i0; i < i1; i++) single(q, (r0 + q) * cols, i);
    }
    near.close(r0, tb);
  }
}

/** Training rows whose packed copy would exceed this many bytes of the kernel's memory are measured in plain JavaScript. */
export const WASM_LIMIT = 1 << 30;
/** Pairs of training rows per kernel call (kept in cache while a block of test rows is measured against them). */
const PAIRS = 256;

interface DistanceKernel extends Kernel {
  distances: (...args: number[]) => void;
}
/** The kernel's instance on this thread; null where WebAssembly is not available (node --jitless): the plain loop then. */
let kernel: DistanceKernel | null | undefined;

/**
 * The distances by the WebAssembly kernel (kernels/knn-distances.wat): two training rows per
 * 128-bit lane pair, each lane the same column-order sum as the plain loop, so the same bits.
 * Returns false when the training rows do not fit its memory.
 */
function wasmScan(near: Nearest, data: Float64Array, rows: number, train: Float64Array, n: number, cols: number): boolean {
  // Pairs in fours (the kernel's tile is two test rows by four pairs).
  const np = 4 * Math.ceil(n / 8);
  const trainBytes = np * cols * 16;
  const testBytes = (TEST_BLOCK + 1) * cols * 8;
  const outBytes = TEST_BLOCK * PAIRS * 16;
  const total = trainBytes + testBytes + (TEST_BLOCK + 1) * 8 + outBytes + TEST_BLOCK * (PAIRS / 4);
  if (total > WASM_LIMIT || cols === 0) return false;
  if (kernel === undefined) kernel = instantiate<DistanceKernel>(wasmBase64);
  if (kernel === null) return false;
  const { memory } = kernel;
  /* c8 ignore next -- the system refused the memory: the plain loop needs none of it */
  if (!reserve(memory, total)) return false;
  const mem = new Float64Array(memory.buffer);
  // Pairs of training rows interleaved, padded with rows of zeros (never offered).
  for (let i = n; i < 2 * np; i++) {
    const base = (i >> 1) * cols * 2 + (i & 1);
    for (let j = 0; j < cols; j++) mem[base + 2 * j] = 0;
  }
  for (let i = 0; i < n; i++) {
    const base = (i >> 1) * cols * 2 + (i & 1);
    for (let j = 0; j < cols; j++) mem[base + 2 * j] = train[i * cols + j];
  }
  const testAt = trainBytes;
  const limAt = testAt + testBytes;
  const outAt = limAt + (TEST_BLOCK + 1) * 8;
  const flagsAt = outAt + outBytes;
  const out = new Float64Array(memory.buffer, outAt, outBytes / 8);
  const limits = new Float64Array(memory.buffer, limAt, TEST_BLOCK + 1);
  const flags = new Uint8Array(memory.buffer, flagsAt, TEST_BLOCK * (PAIRS / 4));
  for (let r0 = 0; r0 < rows; r0 += TEST_BLOCK) {
    const tb = Math.min(TEST_BLOCK, rows - r0);
    const even = tb + (tb & 1);
    mem.set(data.subarray(r0 * cols, (r0 + tb) * cols), testAt / 8);
    if (even > tb) mem.fill(0, testAt / 8 + tb * cols, testAt / 8 + even * cols);
    for (let p0 = 0; p0 < np; p0 += PAIRS) {
      const pairs = Math.min(PAIRS, np - p0);
      for (let q = 0; q < even; q++) limits[q] = q < tb ? near.limit(q) : Number.POSITIVE_INFINITY;
      kernel.distances(testAt, even, p0 * cols * 16, pairs, cols, outAt, limAt, flagsAt);
      const first = 2 * p0;
      const count = Math.min(2 * pairs, n - first);
      const groups = pairs / 4;
      for (let q = 0; q < tb; q++) {
        const at = q * 2 * pairs;
        // A group of eight whose distances were all at or past the row's limit when the chunk
        // began cannot enter (limits only shrink); the rest are offered as the plain loop would.
        if (!near.full(q)) near.scan(q, out, at, count, first);
        else
          for (let g = 0; g < groups; g++)
            if (flags[q * groups + g]) near.scan(q, out, at + 8 * g, Math.min(8, count - 8 * g), first + 8 * g);
      }
    }
    near.close(r0, tb);
  }
  return true;
}
