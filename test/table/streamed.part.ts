// The reader that never holds a file whole (line-index.ts, streamed-grid.ts) must build exactly
// the table the whole-file readers build — same table, same problems at the same positions —
// whatever the stretches it is fed, and must leave every file the fast reader leaves to the full
// reader. Reference: tableFromBytes (held to the full RFC 4180 reader in plain.part.ts).
import fc from 'fast-check';
import t from 'tap';
import { comparable, generatedText } from './generated-file.js';
import { tableFromBytes } from '../../src/table/load.js';
import { LineIndexer } from '../../src/table/line-index.js';
import { readPlain } from '../../src/table/plain.js';
import { extractStretches, streamedGrid, type ReadInto, type StretchHelper } from '../../src/table/streamed-grid.js';
import { buildTable, type DataRoles } from '../../src/table/table.js';

const enc = (s: string) => new TextEncoder().encode(s);
const where = () => undefined;

/** The index of `bytes` fed in stretches of `size` bytes (longer when no line ends within one), as a file is read. */
function indexOf(bytes: Uint8Array, size: number) {
  const indexer = new LineIndexer(0x2c);
  for (let at = 0, length = size; at < bytes.length; ) {
    const stretch = bytes.slice(at, Math.min(bytes.length, at + length));
    const taken = indexer.take(stretch, at, at + stretch.length === bytes.length);
    if (taken === 0) length *= 2;
    else {
      at += taken;
      length = size;
    }
  }
  return indexer.done();
}

const reader =
  (bytes: Uint8Array): ReadInto =>
  (offset, into, length) =>
    into.set(bytes.subarray(offset, offset + length));

/**
 * A helper that parses its share on this thread, as the row thread would (through the arena):
 * it claims `share` stretches from the back before this thread claims any, as a faster other
 * thread would, so every meeting point is tried.
 */
function sameThreadHelper(bytes: Uint8Array, ix: NonNullable<ReturnType<typeof indexOf>>, share: number): StretchHelper {
  return {
    numbers: (length) => new Float64Array(length),
    claims: (length) => new Int32Array(length),
    start: (numberCols, textCols, claims, numbers) => {
      const count = claims.starts.length - 1;
      const mine = Math.min(share, count);
      // Its own counter runs out after `mine` claims; the shared one is moved past them.
      const part = extractStretches(
        ix,
        numberCols,
        textCols,
        { starts: claims.starts, taken: Int32Array.of(count - mine) },
        numbers,
        reader(bytes),
      );
      claims.taken[0] += mine;
      return () => part;
    },
  };
}

const numberCell = fc.oneof(
  fc.double({ noNaN: true, noDefaultInfinity: true }).map(String),
  fc.constantFrom('-0', '.5', '1e3', '007', '12345678901234567', 'NA', '', '12abc', 'Infinity', '1e200', '-3e-200'),
);
const textCell = fc.constantFrom('s1', 's2', 'é', 'K', '\u212a', '', 'a b', 'NA', '€uro', 'x"y');

const file = fc.record({
  rows: fc.array(fc.tuple(textCell, fc.constantFrom('a', 'b', 'c', '', 'NA'), fc.array(numberCell, { minLength: 3, maxLength: 3 })), {
    minLength: 1,
    maxLength: 9,
  }),
  eol: fc.constantFrom('\n', '\r\n', '\r'),
  bom: fc.boolean(),
  trailing: fc.constantFrom('', '\n', '\n\n', '\r\n', '\r\n\n'),
  ragged: fc.integer({ min: -1, max: 20 }),
  blankInside: fc.boolean(),
  stretch: fc.integer({ min: 1, max: 80 }),
  helped: fc.boolean(),
  share: fc.nat(12),
});

t.test('the streamed reader builds the whole-file table, fed in any stretches', async (t) => {
  let streamed = 0;
  fc.assert(
    fc.property(file, fc.boolean(), (f, listed) => {
      const text = generatedText(f);
      const bytes = enc(text);
      const roles: DataRoles = { id: 'id', label: 'label', missing: ['NA'], features: listed ? ['c', 'a'] : undefined };
      const ix = indexOf(bytes, f.stretch);
      if (!ix) return;
      t.ok(readPlain(bytes, 0x2c), 'a file the streamed reader takes is one the fast reader takes');
      const grid = streamedGrid(
        ix,
        { rows: reader(bytes), cells: reader(bytes) },
        f.helped ? sameThreadHelper(bytes, ix, f.share) : undefined,
        f.stretch,
      );
      const built = buildTable(grid, roles, 'f.csv', where);
      if (built.ragged) {
        t.ok(
          tableFromBytes(bytes, 'f.csv', roles, undefined, where).problems.length,
          'ragged rows are a problem for the whole-file readers',
        );
        return;
      }
      streamed++;
      t.same(comparable(built), comparable(tableFromBytes(bytes, 'f.csv', roles, undefined, where)), JSON.stringify(text));
    }),
    { numRuns: 1500 },
  );
  t.ok(streamed > 150, `the streamed reader read ${streamed} of the files itself`);
});

t.test('files the streamed reader leaves to the whole-file readers', async (t) => {
  for (const [text, why] of [
    ['id,x\n"a",1\n', 'a quote'],
    ['id,x\ra,1\r', 'carriage returns without line feeds'],
    ['id,x\na,1\r\r\n', 'a carriage return not right before a line feed'],
    ['\n\n', 'nothing but line breaks'],
    ['', 'nothing'],
    ['id,x\na,\xff\n', 'bytes that are not UTF-8'],
  ] as const) {
    const bytes = why === 'bytes that are not UTF-8' ? Uint8Array.from(text, (c) => c.charCodeAt(0)) : enc(text);
    t.equal(indexOf(bytes, 3), undefined, why);
  }
  t.equal(indexOf(Uint8Array.from([0x1f, 0x8b, 8, 0, 0x0a]), 64), undefined, 'a gzip signature');
  t.equal(indexOf(enc('id\0,x\na,1\n'), 64), undefined, 'a NUL byte at the start');
  t.same(indexOf(enc('\ufeffid,x\r\na,1\r\n\r\n'), 2)?.header, ['id', 'x'], 'a BOM and CRLF are fine');
});

t.test('cells asked for one at a time come from the right stretch', async (t) => {
  const text = `id,label,v\n${Array.from({ length: 50 }, (_, i) => `r${i},${i % 2 ? 'a' : 'b'},${i * 1.5}`).join('\n')}\n`;
  const bytes = enc(text);
  const ix = indexOf(bytes, 16)!;
  const grid = streamedGrid(ix, { rows: reader(bytes), cells: reader(bytes) }, undefined, 24);
  t.equal(grid.text(37, 0), 'r37');
  t.equal(grid.number(3, 2), 4.5);
  t.equal(grid.text(2, 1), 'b');
  t.same(grid.position(49, 2), { line: 51, col: 7 });
  t.equal(grid.text(49, 5), '', 'past the last cell');
});
