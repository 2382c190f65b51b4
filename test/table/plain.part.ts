// The one-pass reader for quote-free files must read exactly what the full RFC 4180 reader
// reads — same table, same problems at the same positions — and hand over to it whenever the
// file is not simple. Reference: the full reader (itself checked against RFC 4180 in
// read.part.ts) and ECMAScript's correctly rounded Number() for every numeric cell.
import fc from 'fast-check';
import t from 'tap';
import { comparable, generatedText } from './generated-file.js';
import { delimitedGrid, readDelimited } from '../../src/table/delimited.js';
import { tableFromBytes } from '../../src/table/load.js';
import { readPlain } from '../../src/table/plain.js';
import { columnDecoder, decodeSpan } from '../../src/table/grid.js';
import { buildTable, type DataRoles } from '../../src/table/table.js';

const enc = (s: string) => new TextEncoder().encode(s);
const where = () => undefined;

function fullReader(bytes: Uint8Array, roles: DataRoles) {
  const read = readDelimited(bytes, 0x2c, 'f.csv');
  return read.table ? buildTable(delimitedGrid(read.table), roles, 'f.csv', where) : { problems: read.problems };
}

const numberCell = fc.oneof(
  fc.double({ noNaN: true, noDefaultInfinity: true }).map(String),
  fc.tuple(fc.integer({ min: -99999, max: 99999 }), fc.nat(999999)).map(([a, b]) => `${a}.${b}`),
  fc.constantFrom(
    '-0',
    '0.000',
    '.5',
    '5.',
    '+3',
    '1e3',
    '-2.5E-3',
    '007',
    '12345678901234567',
    '0.1234567890123456',
    'NA',
    '',
    '12abc',
    'Infinity',
    '-',
    '.',
    // outside the safe range: found while parsing by the fast reader, by a scan by the full one
    '1e200',
    '-3e-200',
    '1234567890123456789e140',
  ),
);
const textCell = fc.constantFrom('s1', 's2', 'é', 'K', '\u212a', '', 'a b', 'NA', 'x"y', '"q,r"');

const file = fc.record({
  rows: fc.array(fc.tuple(textCell, fc.constantFrom('a', 'b', 'c', '', 'NA'), fc.array(numberCell, { minLength: 3, maxLength: 3 })), {
    minLength: 1,
    maxLength: 7,
  }),
  eol: fc.constantFrom('\n', '\r\n', '\r'),
  bom: fc.boolean(),
  trailing: fc.constantFrom('', '\n', '\n\n', '\r\n'),
  ragged: fc.integer({ min: -1, max: 20 }),
  blankInside: fc.boolean(),
});

t.test('the fast reader and the full reader agree on every generated file', async (t) => {
  let fast = 0;
  fc.assert(
    fc.property(file, fc.boolean(), (f, listed) => {
      const text = generatedText(f);
      const bytes = enc(text);
      const roles: DataRoles = { id: 'id', label: 'label', missing: ['NA'], features: listed ? ['c', 'a'] : undefined };
      if (readPlain(bytes, 0x2c)) fast++;
      t.same(
        comparable(tableFromBytes(bytes, 'f.csv', roles, undefined, where)),
        comparable(fullReader(bytes, roles)),
        JSON.stringify(text),
      );
    }),
    { numRuns: 1500 },
  );
  t.ok(fast > 300, `the fast reader read ${fast} of the files itself`);
});

t.test('files the fast reader leaves to the full one', async (t) => {
  t.equal(readPlain(enc('id,x\n"a",1\n'), 0x2c), undefined, 'a quote anywhere');
  t.equal(readPlain(enc('id,x\ra,1\r'), 0x2c), undefined, 'carriage returns without line feeds');
  t.equal(readPlain(enc('\n\n'), 0x2c), undefined, 'nothing but line breaks');
  t.same(readPlain(enc('\ufeffid\tx\r\na\t1\r\n\r\n'), 0x09)?.header, ['id', 'x'], 'TSV, a BOM and CRLF are fine');
});

t.test("a column decoder's text is decodeSpan's for every cell, repeated values and ids alike", async (t) => {
  // Reference: decodeSpan, itself the WHATWG UTF-8 decoder (checked against the full reader above).
  fc.assert(
    fc.property(
      fc.array(fc.oneof(fc.constantFrom('case', 'control', 'é', '', 'x'.repeat(70)), fc.string({ unit: 'binary', maxLength: 12 })), {
        maxLength: 200,
      }),
      (cells) => {
        const bytes = enc(cells.join('\n'));
        const decode = columnDecoder();
        let start = 0;
        for (const cell of cells) {
          const end = start + enc(cell).length;
          if (decode(bytes, start, end) !== decodeSpan(bytes, start, end)) return false;
          start = end + 1;
        }
        return true;
      },
    ),
    { numRuns: 500 },
  );
  // Ids (every value new) past the point where the decoder stops keeping values.
  const ids = Array.from({ length: 300 }, (_, i) => `s${i}`);
  const bytes = enc(ids.join(','));
  const decode = columnDecoder();
  let start = 0;
  t.same(
    ids.map((id) => {
      const text = decode(bytes, start, start + id.length);
      start += id.length + 1;
      return text;
    }),
    ids,
  );
});
