import fc from 'fast-check';
import t from 'tap';
import { topIndices } from '../../src/preprocess/select.js';

t.test('the top-N shortlist equals a full sort (descending score, earlier position on ties, NaN last)', async (t) => {
  fc.assert(
    fc.property(
      fc.array(fc.oneof(fc.integer({ min: -5, max: 5 }), fc.constant(NaN), fc.constant(Infinity)), { minLength: 1, maxLength: 60 }),
      fc.integer({ min: 1, max: 60 }),
      (values, top) => {
        const scores = Float64Array.from(values);
        const k = Math.min(top, values.length);
        const v = (j: number) => (Number.isNaN(scores[j]) ? -Infinity : scores[j]);
        const expected = Array.from(scores.keys())
          .sort((a, b) => (v(a) === v(b) ? a - b : v(b) > v(a) ? 1 : -1))
          .slice(0, k)
          .sort((a, b) => a - b);
        return JSON.stringify(topIndices(scores, k)) === JSON.stringify(expected);
      },
    ),
    { numRuns: 500 },
  );
  t.pass('agreed');
});

// DEVELOPERS.md promises that fit and apply suffice for a transform: a step without the
// optional speed members must work in a pipeline with a selection (it once crashed in pruning).
t.test('a transform with only fit and apply works beside a selection', async (t) => {
  const { transforms } = await import('../../src/preprocess/registry.js');
  const { fitPipelineOnRows } = await import('../../src/preprocess/by-columns.js');
  const { applyPipeline, prunePipeline } = await import('../../src/preprocess/pipeline.js');
  const registry = transforms as unknown as Record<string, unknown>;
  registry.double = {
    fit: () => ({}),
    apply: (_: unknown, X: { rows: number; cols: number; data: Float64Array }) => ({ ...X, data: X.data.map((v) => v * 2) }),
  };
  try {
    const X = { rows: 6, cols: 3, data: Float64Array.from([1, 5, 0, 2, 6, 0, 3, 7, 1, 4, 1, 1, 5, 2, 0, 6, 3, 1]) };
    const y = Int32Array.from([0, 0, 0, 1, 1, 1]);
    const steps = [{ step: 'double' }, { step: 'select', top: 1, by: 'f-test' }] as never;
    const { pipeline } = fitPipelineOnRows(steps, X, Int32Array.from([0, 1, 2, 3, 4, 5]), y, 2, ['a', 'b', 'c']);
    const pruned = prunePipeline(pipeline, 3);
    t.same(Array.from(applyPipeline(pruned, X).data), Array.from(applyPipeline(pipeline, X).data));
  } finally {
    delete registry.double;
  }
});
