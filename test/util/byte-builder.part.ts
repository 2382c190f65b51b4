// ByteBuilder writes exactly the bytes the engine's own encoders write: Buffer.from for UTF-8
// (WHATWG Encoding, lone surrogates as U+FFFD), JSON.stringify for JSON strings (ECMA-262), and
// String / toString(16) for integers. Growth from a tiny first buffer must not change a byte.
import fc from 'fast-check';
import t from 'tap';
import { ByteBuilder } from '../../src/util/byte-builder.js';

type Piece = { kind: 'text' | 'json' | 'bytes'; s: string } | { kind: 'int' | 'hex' | 'byte'; n: number };

const piece: fc.Arbitrary<Piece> = fc.oneof(
  fc.record({ kind: fc.constantFrom('text' as const, 'json' as const, 'bytes' as const), s: fc.string({ unit: 'binary', maxLength: 40 }) }),
  fc.record({ kind: fc.constant('int' as const), n: fc.oneof(fc.nat(12), fc.nat(2 ** 31 - 1)) }),
  fc.record({ kind: fc.constant('hex' as const), n: fc.nat(2 ** 32 - 1) }),
  fc.record({ kind: fc.constant('byte' as const), n: fc.nat(127) }),
);

function expected(p: Piece): Buffer {
  if ('s' in p) return Buffer.from(p.kind === 'json' ? JSON.stringify(p.s) : p.s);
  if (p.kind === 'int') return Buffer.from(String(p.n));
  if (p.kind === 'hex') return Buffer.from(p.n.toString(16).padStart(8, '0'));
  return Buffer.from([p.n]);
}

t.test('the bytes are what the engine writes, piece by piece, whatever the first size', async (t) => {
  fc.assert(
    fc.property(fc.array(piece, { maxLength: 60 }), fc.nat(200), (pieces, capacity) => {
      const out = new ByteBuilder(capacity);
      for (const p of pieces) {
        if ('s' in p) {
          if (p.kind === 'text') out.text(p.s);
          else if (p.kind === 'json') out.jsonString(p.s);
          else out.append(Buffer.from(p.s));
        } else if (p.kind === 'int') out.int(p.n);
        else if (p.kind === 'hex') out.hex8(p.n);
        else out.byte(p.n);
      }
      const want = Buffer.concat(pieces.map(expected));
      return out.length === want.length && Buffer.from(out.result()).equals(want);
    }),
    { numRuns: 3000 },
  );
  const edge = new ByteBuilder(0);
  for (const n of [0, 9, 10, 99, 100, 2147483647]) edge.int(n);
  t.equal(Buffer.from(edge.result()).toString(), '0910991002147483647', 'integers at their digit boundaries');
});

t.test('the assignment CSV in pieces of any size is the whole file, byte for byte', async (t) => {
  // Reference: the assignment CSV as one text (itself checked against the spec's vectors in test/split).
  const { assignmentCsv, assignmentCsvPieces } = await import('../../src/split/csv.js');
  const { SPLIT_VERSION } = await import('../../src/split/assignment.js');
  fc.assert(
    fc.property(
      fc.uniqueArray(fc.string({ unit: 'binary', minLength: 1, maxLength: 6 }), { minLength: 1, maxLength: 40 }),
      fc.integer({ min: 1, max: 3 }),
      fc.integer({ min: 1, max: 64 }),
      (ids, repeats, piece) => {
        const fold = Int32Array.from({ length: ids.length * repeats }, (_, i) => 1 + (i % 7));
        const a = { version: SPLIT_VERSION, ids, repeats, folds: 7, fold } as const;
        // Each piece is a view of one reused buffer: copied as it comes.
        const copies: Buffer[] = [];
        for (const p of assignmentCsvPieces(a, piece)) copies.push(Buffer.from(p));
        return Buffer.concat(copies).equals(Buffer.from(assignmentCsv(a)));
      },
    ),
    { numRuns: 300 },
  );
  t.pass('300 generated assignments');
});
