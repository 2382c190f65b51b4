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
