/**
 * TextBuilder: the text is exactly the lines added, whether it grows by doubling or by one
 * reservation. numberText: exactly ECMAScript's Number::toString (String(v)), the text every
 * number in foldseal's CSV outputs has always had.
 */
import fc from 'fast-check';
import t from 'tap';
import { numberText, TextBuilder } from '../../src/table/csv-write.js';

t.test('numberText is String(v) for every double', async (t) => {
  // Reference: ECMA-262 Number::toString, as the engine's String() implements it.
  fc.assert(
    fc.property(fc.double(), (v) => numberText(v) === String(v)),
    { numRuns: 20000 },
  );
  for (const v of [0, -0, Number.NaN, Infinity, -Infinity, 5e-324, Number.MAX_VALUE, 1e21, 1e-7, 0.1 + 0.2, 123456789012345680000])
    t.equal(numberText(v), String(v), String(v));
});

t.test('a reservation changes how the buffer grows, never the text', async (t) => {
  fc.assert(
    fc.property(
      fc.array(fc.string({ unit: 'grapheme', maxLength: 300 }), { maxLength: 400 }),
      fc.nat(400),
      fc.nat(5_000_000),
      (lines, at, room) => {
        const plain = new TextBuilder();
        const reserved = new TextBuilder();
        lines.forEach((line, i) => {
          plain.add(line);
          reserved.add(line);
          if (i === at) reserved.reserve(room);
        });
        const expected = lines.join('');
        return plain.text() === expected && reserved.text() === expected && reserved.size === Buffer.byteLength(expected);
      },
    ),
    { numRuns: 60 },
  );
  // Past the 64 K characters gathered before a copy into the buffer, and past its first megabyte.
  const long = new TextBuilder();
  const line = `${'x'.repeat(99)}\n`;
  for (let i = 0; i < 30_000; i++) {
    long.add(line);
    if (i === 1000) long.reserve(3_200_000);
  }
  t.equal(long.text(), line.repeat(30_000));
});
