/**
 * The label-proxy screen (mayReachSeparation) against the exact measure it stands in for: on
 * generated columns full of ties, missing values, huge and infinite values and up to four
 * classes, it never answers "no" when pairwiseSeparation reaches the threshold (fast-check).
 */
import fc from 'fast-check';
import t from 'tap';
import { mayReachSeparation, pairwiseSeparation } from '../../src/audit/separation.js';

t.test('the screen is never wrong when it rules a column out', async (t) => {
  const value = fc.oneof(
    { arbitrary: fc.integer({ min: 0, max: 3 }), weight: 10 },
    { arbitrary: fc.double({ min: -5, max: 5, noNaN: true }), weight: 20 },
    { arbitrary: fc.constantFrom(Number.NaN, 1e308, -1e308, Number.POSITIVE_INFINITY, 1e-300), weight: 1 },
  );
  let ruledOut = 0;
  fc.assert(
    fc.property(
      fc.integer({ min: 2, max: 4 }),
      fc.array(fc.tuple(value, fc.nat()), { minLength: 1, maxLength: 300 }),
      fc.double({ min: 0.5, max: 1, noNaN: true }),
      (classes, cells, threshold) => {
        const score = Float64Array.from(cells, ([v]) => v);
        const y = Int32Array.from(cells, ([, c]) => c % classes);
        const exact = pairwiseSeparation(score, y, classes);
        const maybe = mayReachSeparation(score, y, classes, threshold);
        if (!maybe) ruledOut++;
        return maybe || exact === null || exact < threshold;
      },
    ),
    { numRuns: 400 },
  );
  t.ok(ruledOut > 10, `${ruledOut} of 400 columns ruled out (the rest needed the exact measure)`);
});

t.test('separated classes: the screen says maybe; shuffled ones: no', async (t) => {
  const n = 2000;
  const y = Int32Array.from({ length: n }, (_, i) => i % 2);
  const apart = Float64Array.from({ length: n }, (_, i) => (i % 2) * 10 + Math.sin(i));
  t.ok(mayReachSeparation(apart, y, 2, 0.99));
  const mixed = Float64Array.from({ length: n }, (_, i) => Math.sin(i * 7.1));
  t.notOk(mayReachSeparation(mixed, y, 2, 0.99));
  t.notOk(mayReachSeparation(new Float64Array(n).fill(3), y, 2, 0.99), 'a constant column: AUC ½');
  t.ok(mayReachSeparation(new Float64Array(n).fill(3), y, 2, 0.5), 'which reaches a threshold of ½');
});
