/**
 * logistic's row passes (src/model/logistic-rows.ts): the committed WebAssembly module is the one
 * its text assembles to, and the kernel gives the very bits of the plain loops on generated
 * matrices of odd shapes (fast-check); a newton-cg fit in a process without WebAssembly (node
 * --jitless) returns the same weights as here. Agreement with scikit-learn's logistic regression
 * is checked in test/reference through the kernel.
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import fc from 'fast-check';
import t from 'tap';
import * as kernel from '../../src/model/kernels/logistic-passes.wasm.js';
import { committedKernelMatches } from './kernel-module.js';
import { rowPasses } from '../../src/model/logistic-rows.js';
import { logistic } from '../../src/model/logistic.js';
import { root } from '../helpers.js';

t.test('the committed kernel module is what its text assembles to (npm run kernels after an edit)', (t) =>
  committedKernelMatches(t, 'logistic-passes.wat', kernel),
);

const bits = (a: Float64Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength).toString('hex');

t.test('kernel and plain loops give the same bits', async (t) => {
  const value = fc.oneof(fc.integer({ min: -2, max: 2 }), fc.double({ min: -1e3, max: 1e3, noNaN: true }), fc.constant(1e-310));
  let compared = 0;
  fc.assert(
    fc.property(fc.integer({ min: 1, max: 41 }), fc.integer({ min: 1, max: 13 }), fc.infiniteStream(value), (n, p, values) => {
      const it = values[Symbol.iterator]();
      const next = () => it.next().value as number;
      const X = { rows: n, cols: p, data: Float64Array.from({ length: n * p }, next) };
      const kernel = rowPasses(X);
      const plain = rowPasses(X, true);
      const inputs = [...Array.from({ length: n }, next), ...Array.from({ length: n }, next), ...Array.from({ length: 2 * (p + 1) }, next)];
      for (const rows of [kernel, plain]) {
        rows.r.set(inputs.slice(0, n));
        rows.w.set(inputs.slice(n, 2 * n));
        rows.theta.set(inputs.slice(2 * n, 2 * n + p + 1));
        rows.d.set(inputs.slice(2 * n + p + 1));
        rows.scores();
        rows.gradient();
        rows.hessian();
      }
      compared++;
      return (
        bits(kernel.z) === bits(plain.z) &&
        bits(kernel.grad) === bits(plain.grad) &&
        bits(kernel.diag) === bits(plain.diag) &&
        bits(kernel.out) === bits(plain.out)
      );
    }),
    { numRuns: 300 },
  );
  t.equal(compared, 300);
});

const table = () => {
  const rows = 90;
  const cols = 70;
  const data = Float64Array.from({ length: rows * cols }, (_, i) => Math.sin(i * 0.731) * (1 + (i % cols) / 20));
  const y = Int32Array.from({ length: rows }, (_, r) => (data[r * cols] + data[r * cols + 3] > 0 ? 1 : 0));
  return { X: { rows, cols, data }, y };
};

t.test('without WebAssembly (node --jitless) a newton-cg fit gives the same weights', async (t) => {
  const model = pathToFileURL(join(root, 'dist', 'src', 'model', 'logistic.js')).href;
  const script = `
    import { logistic } from ${JSON.stringify(model)};
    const rows = 90, cols = 70;
    const data = Float64Array.from({ length: rows * cols }, (_, i) => Math.sin(i * 0.731) * (1 + (i % cols) / 20));
    const y = Int32Array.from({ length: rows }, (_, r) => (data[r * cols] + data[r * cols + 3] > 0 ? 1 : 0));
    const m = logistic.fit({ rows, cols, data }, y, { l2: 1, tolerance: 1e-10, solver: 'newton-cg', 'max-iterations': 200 }, { classCount: 2 });
    console.log(JSON.stringify({ wasm: typeof WebAssembly, weights: m.weights }));`;
  const r = spawnSync(process.execPath, ['--jitless', '--input-type=module', '-e', script], { encoding: 'utf8' });
  t.equal(r.status, 0, r.stderr);
  const out = JSON.parse(r.stdout);
  t.equal(out.wasm, 'undefined', 'no WebAssembly in that process');
  const { X, y } = table();
  const here = logistic.fit(X, y, { l2: 1, tolerance: 1e-10, solver: 'newton-cg', 'max-iterations': 200 }, { classCount: 2 });
  t.same(here.weights, out.weights, 'the kernel here: the same weights, bit for bit');
});
