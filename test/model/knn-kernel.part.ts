/**
 * knn's WebAssembly distance kernel: the committed module is the one its text assembles to, and
 * its neighbours are exactly those of the plain JavaScript loop and of a sort of all distances by
 * (distance, id order) — the definition in the split spec — on generated tables full of ties,
 * huge values and odd sizes (fast-check). The scikit-learn cross-check of knn's probabilities
 * runs through the kernel too (test/reference).
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import fc from 'fast-check';
import t from 'tap';
import { neighbours, type KnnParams } from '../../src/model/knn.js';
import * as kernel from '../../src/model/kernels/knn-distances.wasm.js';
import { committedKernelMatches } from './kernel-module.js';
import { root } from '../helpers.js';

t.test('the committed kernel module is what its text assembles to (npm run kernels after an edit)', (t) =>
  committedKernelMatches(t, 'knn-distances.wat', kernel),
);

/** The definition: every distance summed in column order, sorted by (distance, training position), the first k. */
function bySort(p: KnnParams, X: { rows: number; cols: number; data: Float64Array }, r: number): number[] {
  const d = p.X.map((row, i) => {
    let s = 0;
    for (let j = 0; j < X.cols; j++) {
      const e = X.data[r * X.cols + j] - row[j];
      s += e * e;
    }
    return [s, i] as const;
  });
  d.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  return d
    .slice(0, Math.min(p.k, p.X.length))
    .map(([, i]) => i)
    .sort((a, b) => a - b);
}

t.test('kernel, plain loop and full sort choose the same neighbours', async (t) => {
  // Small integers make many equal distances (ties broken by training position); 1e200 overflows
  // the squares to Infinity, so rows tie at Infinity as well.
  const value = fc.oneof(fc.integer({ min: 0, max: 2 }), fc.constant(1e200), fc.double({ min: -3, max: 3, noNaN: true }));
  let compared = 0;
  fc.assert(
    fc.property(
      fc.integer({ min: 1, max: 9 }),
      fc.integer({ min: 1, max: 70 }),
      fc.integer({ min: 1, max: 40 }),
      fc.integer({ min: 1, max: 12 }),
      fc.infiniteStream(value),
      (cols, n, rows, k, values) => {
        const it = values[Symbol.iterator]();
        const next = () => it.next().value as number;
        const p: KnnParams = {
          k,
          classCount: 2,
          X: Array.from({ length: n }, () => Array.from({ length: cols }, next)),
          y: Array.from({ length: n }, (_, i) => i % 2),
        };
        const X = { rows, cols, data: Float64Array.from({ length: rows * cols }, next) };
        const kernel = neighbours(p, X);
        const plain = neighbours(p, X, true);
        for (let r = 0; r < rows; r++) {
          const a = [...kernel.of(r)].sort((u, v) => u - v);
          const b = [...plain.of(r)].sort((u, v) => u - v);
          const c = bySort(p, X, r);
          compared++;
          if (a.join() !== c.join() || b.join() !== c.join()) return false;
        }
        return true;
      },
    ),
    { numRuns: 150 },
  );
  t.ok(compared > 1000, `${compared} test rows compared`);
});

t.test('a training set of many chunks: the kernel and the plain loop agree row for row', async (t) => {
  // 1,237 training rows: several chunks of the kernel and a last, partial group of eight.
  let seed = 11;
  const next = () => {
    seed = (seed * 48271) % 2147483647;
    return Math.floor((seed / 2147483647) * 5) / 2;
  };
  const cols = 6;
  const p: KnnParams = {
    k: 9,
    classCount: 2,
    X: Array.from({ length: 1237 }, () => Array.from({ length: cols }, next)),
    y: Array.from({ length: 1237 }, (_, i) => i % 2),
  };
  const X = { rows: 101, cols, data: Float64Array.from({ length: 101 * cols }, next) };
  const kernel = neighbours(p, X);
  const plain = neighbours(p, X, true);
  const differ = Array.from({ length: X.rows }, (_, r) => r).filter(
    (r) => [...kernel.of(r)].sort((a, b) => a - b).join() !== [...plain.of(r)].sort((a, b) => a - b).join(),
  );
  t.same(differ, []);
});

t.test('without WebAssembly (node --jitless) knn takes the plain loop and gives the same neighbours', async (t) => {
  const knnModule = pathToFileURL(join(root, 'dist', 'src', 'model', 'knn.js')).href;
  const script = `
    import { neighbours } from ${JSON.stringify(knnModule)};
    const X = Array.from({ length: 40 }, (_, i) => [i % 7, (i * 3) % 5, i % 2]);
    const p = { k: 4, classCount: 2, X, y: X.map((_, i) => i % 2) };
    const T = { rows: 9, cols: 3, data: Float64Array.from({ length: 27 }, (_, i) => (i * 5) % 6) };
    const rows = (near) => Array.from({ length: 9 }, (_, r) => [...near.of(r)].sort((a, b) => a - b).join(' '));
    console.log(JSON.stringify({ wasm: typeof WebAssembly, kernel: rows(neighbours(p, T)), plain: rows(neighbours(p, T, true)) }));`;
  const r = spawnSync(process.execPath, ['--jitless', '--input-type=module', '-e', script], { encoding: 'utf8' });
  t.equal(r.status, 0, r.stderr);
  const out = JSON.parse(r.stdout);
  t.equal(out.wasm, 'undefined', 'no WebAssembly in that process');
  t.same(out.kernel, out.plain);
  // The same table here, through the kernel.
  const X = Array.from({ length: 40 }, (_, i) => [i % 7, (i * 3) % 5, i % 2]);
  const here = neighbours(
    { k: 4, classCount: 2, X, y: X.map((_, i) => i % 2) },
    {
      rows: 9,
      cols: 3,
      data: Float64Array.from({ length: 27 }, (_, i) => (i * 5) % 6),
    },
  );
  t.same(
    Array.from({ length: 9 }, (_, r) => [...here.of(r)].sort((a, b) => a - b).join(' ')),
    out.plain,
    'the kernel here agrees',
  );
});
