/**
 * numberText: exactly ECMAScript's Number::toString (String(v)), the text every number in
 * foldseal's CSV outputs has always had.
 */
import fc from 'fast-check';
import t from 'tap';
import { numberText } from '../../src/table/csv-write.js';

t.test('numberText is String(v) for every double', async (t) => {
  // Reference: ECMA-262 Number::toString, as the engine's String() implements it.
  fc.assert(
    fc.property(fc.double(), (v) => numberText(v) === String(v)),
    { numRuns: 20000 },
  );
  for (const v of [0, -0, Number.NaN, Infinity, -Infinity, 5e-324, Number.MAX_VALUE, 1e21, 1e-7, 0.1 + 0.2, 123456789012345680000])
    t.equal(numberText(v), String(v), String(v));
});
