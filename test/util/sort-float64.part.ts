// sortFloat64 must put numbers in exactly the order of Float64Array.prototype.sort() without a
// comparator (ECMA-262 TypedArray SortCompare: ascending, −0 before +0, NaN last). Reference:
// the engine's own native sort, compared element by element with Object.is.
import fc from 'fast-check';
import t from 'tap';
import { sortFloat64 } from '../../src/util/sort-float64.js';

function sameOrder(values: Float64Array): boolean {
  const native = Float64Array.from(values).sort();
  // The radix sort itself, whatever the length (by default short arrays go to the native sort).
  const ours = sortFloat64(Float64Array.from(values), 2);
  for (let i = 0; i < native.length; i++) if (!Object.is(native[i], ours[i])) return false;
  return true;
}

t.test('the native order, for any doubles, from the radix sort at any length', async (t) => {
  const special = fc.constantFrom(Number.NaN, -0, 0, Infinity, -Infinity, 5e-324, -5e-324, Number.MAX_VALUE, -Number.MIN_VALUE, 1, -1);
  fc.assert(
    fc.property(fc.array(fc.oneof(fc.double(), special, fc.double({ min: 0, max: 1 })), { minLength: 0, maxLength: 3000 }), (values) =>
      sameOrder(Float64Array.from(values)),
    ),
    { numRuns: 60 },
  );
  // A NaN that the hardware makes (sign bit set) sorts last like any other.
  const bits = new Float64Array(4000).map((_, i) => (i % 5) - 2.5 + i * 1e-9);
  new Uint32Array(bits.buffer).set([0, 0xfff80000], 2 * 17);
  t.ok(sameOrder(bits), 'a negative NaN');
  t.ok(Number.isNaN(sortFloat64(Float64Array.from(bits), 2)[3999]), 'last');
  t.same(Array.from(sortFloat64(Float64Array.of(3, 1, 2))), [1, 2, 3], 'a short array, natively');
  // Packed (hash, row) doubles and probabilities, as the callers sort them.
  const packed = Float64Array.from({ length: 50_000 }, (_, r) => ((r * 2654435761) >>> 0) * 2097152 + r);
  t.ok(sameOrder(packed), 'packed integers below 2^53');
  t.ok(sameOrder(Float64Array.from({ length: 50_000 }, (_, i) => (Math.sin(i) + 1) / 2)), 'probabilities');
  t.ok(sameOrder(new Float64Array(5000).fill(0.25)), 'all equal: every pass skipped');
});
