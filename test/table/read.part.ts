import fc from 'fast-check';
import t from 'tap';
import { delimitedGrid, readDelimited, textColumn } from '../../src/table/delimited.js';
import { plainGrid, readPlain } from '../../src/table/plain.js';
import { parseNumberBytes } from '../../src/table/number.js';
import { buildTable } from '../../src/table/table.js';

const enc = (s: string) => new TextEncoder().encode(s);
const num = (s: string) => {
  const b = enc(s);
  return parseNumberBytes(b, 0, b.length);
};

// Reference: ECMAScript Number::toString round-trips every double, and Number(text) is
// correctly rounded (ECMA-262 §6.1.6.1.20, §7.1.4.1.1); the fast path must agree bit for bit.
t.test('number parsing agrees with correctly rounded Number() on every double', async (t) => {
  fc.assert(
    fc.property(
      fc.double({ noNaN: true, noDefaultInfinity: true }),
      (x) => Object.is(num(String(x)), x) || (x === 0 && num(String(x)) === 0),
    ),
    { numRuns: 5000 },
  );
  fc.assert(
    fc.property(fc.integer({ min: -1e6, max: 1e6 }), fc.nat(9999), fc.integer({ min: -30, max: 30 }), (a, b, e) => {
      const text = `${a}.${String(b).padStart(4, '0')}e${e}`;
      return Object.is(num(text), Number(text));
    }),
    { numRuns: 3000 },
  );
  t.pass('agreed');
});

t.test('strict grammar: these are not numbers', async (t) => {
  for (const s of ['', '1,5', '12abc', '0x10', 'Infinity', 'NaN', '1e', '.', '-', '1.2.3', ' 1', '1 ', '+'])
    t.ok(Number.isNaN(num(s)), JSON.stringify(s));
  for (const [s, v] of [
    ['.5', 0.5],
    ['5.', 5],
    ['-0.25', -0.25],
    ['+3', 3],
    ['1E3', 1000],
    ['1e-400', 0],
    ['123456789012345678901234567890', 1.2345678901234568e29],
  ] as const)
    t.equal(num(s), v, s);
});

t.test('RFC 4180 quoting, CRLF, a BOM and a last line without a break', async (t) => {
  const text = '\ufeffid,note,x\r\n"a,1","he said ""hi""",1.5\r\nb,"two\nlines",2\r\nc,,3';
  const r = readDelimited(enc(text), 0x2c, 'f.csv');
  t.same(r.problems, []);
  const tb = r.table!;
  t.same(tb.header, ['id', 'note', 'x']);
  t.same(textColumn(tb, 0), ['a,1', 'b', 'c']);
  t.same(textColumn(tb, 1), ['he said "hi"', 'two\nlines', '']);
  t.same(Array.from(tb.rowLine), [2, 3, 5]);
});

t.test('TSV and trailing blank lines', async (t) => {
  const r = readDelimited(enc('id\tx\nq\t1\n\n\n'), 0x09, 'f.tsv');
  t.equal(r.table!.rows, 1);
});

t.test('malformed CSV is a located problem', async (t) => {
  t.same(
    readDelimited(enc('a,b\n1,"x\n'), 0x2c, 'f.csv').problems.map((p) => [p.code, p.position]),
    [['csv-unclosed-quote', { line: 2, col: 3 }]],
  );
  t.same(
    readDelimited(enc('a,b\n1,"x"y\n'), 0x2c, 'f.csv').problems.map((p) => [p.code, p.position]),
    [['csv-text-after-quote', { line: 2, col: 6 }]],
  );
  t.same(
    readDelimited(enc('a,b\n1,2,3\n'), 0x2c, 'f.csv').problems.map((p) => [p.code, p.message]),
    [['csv-ragged-row', 'row has 3 cells but the header has 2']],
  );
});

t.test('features: explicit list, exclusions, text columns and missing tokens', async (t) => {
  const bytes = enc('id,lab,site,a,b,c\n1,x,s1,1,NA,3\n2,y,s2,4,5,6\n');
  const where = () => undefined;
  // The same answers from both readers (the file has no quotes, so the fast one can read it).
  for (const grid of [delimitedGrid(readDelimited(bytes, 0x2c, 'f.csv').table!), plainGrid(readPlain(bytes, 0x2c)!)]) {
    const r = { table: grid };
    const auto = buildTable(r.table!, { id: 'id', label: 'lab', missing: ['NA'] }, 'f.csv', where).table!;
    t.same(auto.featureNames, ['a', 'b', 'c']);
    t.same(auto.ignoredColumns, ['site']);
    t.ok(Number.isNaN(auto.X.data[1]));
    const listed = buildTable(r.table!, { id: 'id', label: 'lab', features: ['c', 'a'], missing: ['NA'] }, 'f.csv', where).table!;
    t.same(Array.from(listed.X.data), [3, 1, 6, 4], 'row-major, in the listed order');
    const excluded = buildTable(r.table!, { id: 'id', label: 'lab', features: { exclude: ['b', 'zz'] }, missing: ['NA'] }, 'f.csv', where);
    t.same(excluded.table!.featureNames, ['a', 'c']);
    t.same(
      excluded.problems.map((p) => p.code),
      ['data-unknown-exclude'],
    );
    const clash = buildTable(r.table!, { id: 'id', label: 'lab', features: ['lab', 'nope'], missing: [] }, 'f.csv', where);
    t.same(
      clash.problems.map((p) => p.code),
      ['data-feature-role', 'data-missing-column'],
    );
  }
});
