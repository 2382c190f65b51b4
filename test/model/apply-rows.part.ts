// Every step that copies rows in the pass that transforms them (applyRows) must give exactly the
// numbers of its own apply on a copy of those rows: the reference is the step's plain apply.
import fc from 'fast-check';
import t from 'tap';
import { transforms } from '../../src/preprocess/registry.js';
import { takeRows } from '../../src/table/matrix.js';

t.test('applyRows is apply on the copied rows, bit for bit, for every step that has it', async (t) => {
  const fused = Object.entries(transforms).filter(([, impl]) => impl.applyRows);
  t.ok(fused.length > 0, `steps with applyRows: ${fused.map(([name]) => name).join(', ')}`);
  for (const [name, impl] of fused) {
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 12 }),
        fc.integer({ min: 1, max: 6 }),
        fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 72, maxLength: 72 }),
        fc.array(fc.nat(11), { minLength: 1, maxLength: 20 }),
        (rows, cols, values, picks) => {
          const X = { rows, cols, data: Float64Array.from(values.slice(0, rows * cols)) };
          const y = Int32Array.from({ length: rows }, (_, i) => i % 2);
          const params = impl.fit(X, y, 2, {} as never);
          const at = Int32Array.from(picks, (r) => r % rows);
          const plain = impl.apply(params, takeRows(X, at));
          const made = impl.applyRows!(params, X, at, new Float64Array(at.length * cols));
          return made.rows === plain.rows && made.cols === plain.cols && made.data.every((v, i) => Object.is(v, plain.data[i]));
        },
      ),
      { numRuns: 300 },
    );
    t.pass(name);
  }
});
