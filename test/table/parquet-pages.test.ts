// foldseal's own Parquet page decoding (src/io/parquet-pages.ts, snappy.ts), checked against an
// outside reader: hyparquet's general reader (parquetRead), decoding every column of the same
// files. The files are written by Apache Arrow's Rust Parquet writer (parquet-wasm) in every
// layout the fast path claims: data pages v1 and v2, dictionary and plain pages, many small
// pages, many row groups, optional columns with nulls, DOUBLE/FLOAT/INT32/INT64 and UTF-8 text,
// snappy/gzip/none; and one encoding the fast path gives back (BYTE_STREAM_SPLIT). Data:
// scikit-learn's bundled breast-cancer table (test/reference/data).
import { createRequire } from 'node:module';
import { gunzipSync } from 'node:zlib';
import t from 'tap';
import { parquetRead } from 'hyparquet';
import { referenceTable } from '../helpers.js';
import { readParquet } from '../../src/io/parquet.js';
import { readFooter } from '../../src/io/parquet-footer.js';
import { startRowThread } from '../../src/io/row-helper.js';
import { unsnappy } from '../../src/io/snappy.js';
import { readStruct } from '../../src/io/thrift-compact.js';
import type { ColumnTable } from '../../src/table/columns.js';
import { tableFromLayout } from '../../src/table/load.js';

const require = createRequire(import.meta.url);
const pq = require('parquet-wasm/node');
const arrow = require('apache-arrow');

const { body } = referenceTable('breast-cancer.csv');
const num = (r: string[], c: number) => Number(r[c]);

function table() {
  return arrow.tableFromArrays({
    id: body.map((r) => r[0]),
    // Text with nulls.
    diagnosis: arrow.vectorFromArray(
      body.map((r, i) => (i % 37 === 5 ? null : r[1])),
      new arrow.Utf8(),
    ),
    required: Float64Array.from(body, (r) => num(r, 2)),
    holes: arrow.vectorFromArray(
      body.map((r, i) => (i % 11 === 3 ? null : num(r, 3))),
      new arrow.Float64(),
    ),
    single: Float32Array.from(body, (r) => num(r, 4)),
    whole: Int32Array.from(body, (r) => Math.round(num(r, 5) * 1000)),
    wide: BigInt64Array.from(body, (r) => BigInt(Math.round(num(r, 6) * 1e6)) - 10n ** 12n),
    split: Float64Array.from(body, (r) => num(r, 7)),
  });
}

function write(options: { v2: boolean; dictionary: boolean; small: boolean; codec: number }): Uint8Array {
  let props = new pq.WriterPropertiesBuilder()
    .setCompression(options.codec)
    .setWriterVersion(options.v2 ? pq.WriterVersion.V2 : pq.WriterVersion.V1)
    .setDictionaryEnabled(options.dictionary)
    .setColumnDictionaryEnabled('split', false)
    .setColumnEncoding('split', pq.Encoding.BYTE_STREAM_SPLIT);
  if (options.small) props = props.setDataPageSizeLimit(512).setWriteBatchSize(64).setMaxRowGroupSize(100);
  return pq.writeParquet(pq.Table.fromIPCStream(arrow.tableToIPC(table(), 'stream')), props.build());
}

/** Every cell as hyparquet's general reader decodes it: nulls as NaN or '', integers as numbers. */
async function reference(bytes: Uint8Array): Promise<Map<string, unknown[]>> {
  const columns = new Map<string, unknown[]>();
  await parquetRead({
    file: bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer,
    // hyparquet reads snappy itself; gzip through node:zlib.
    compressors: { GZIP: (input: Uint8Array) => new Uint8Array(gunzipSync(input)) },
    onChunk: ({ columnName, columnData, rowStart }) => {
      const out = columns.get(columnName) ?? [];
      columns.set(columnName, out);
      for (let i = 0; i < columnData.length; i++) out[rowStart + i] = columnData[i];
    },
  });
  return columns;
}

function cells(read: ColumnTable, name: string): unknown[] {
  const c = read.names.indexOf(name);
  const column = read.columns[c];
  if (typeof column !== 'number') return column;
  return Array.from({ length: read.rows }, (_, r) => read.numbers[r * read.width + column]);
}

function same(ours: unknown[], theirs: unknown[]): boolean {
  if (ours.length !== theirs.length) return false;
  return ours.every((v, i) => {
    const w = theirs[i];
    if (w === null || w === undefined) return typeof v === 'number' ? Number.isNaN(v) : v === '';
    return Object.is(v, typeof w === 'bigint' ? Number(w) : w);
  });
}

const layouts = [false, true].flatMap((v2) =>
  [true, false].flatMap((dictionary) =>
    [false, true].flatMap((small) =>
      (
        [
          ['snappy', pq.Compression.SNAPPY],
          ['gzip', pq.Compression.GZIP],
          ['none', pq.Compression.UNCOMPRESSED],
        ] as const
      ).map(([codecName, codec]) => ({ v2, dictionary, small, codec, codecName })),
    ),
  ),
);

t.test('every page layout decodes as the general reader decodes it', async (t) => {
  for (const layout of layouts) {
    const name = `${layout.v2 ? 'v2' : 'v1'}, ${layout.dictionary ? 'dictionary' : 'plain'}, ${layout.small ? 'small pages and row groups' : 'one row group'}, ${layout.codecName}`;
    const bytes = write(layout);
    const read = await readParquet(bytes, name);
    if (read.problem) {
      t.fail(`${name}: ${read.problem.message}`);
      continue;
    }
    const theirs = await reference(bytes);
    t.equal(read.table.rows, body.length, `${name}: rows`);
    t.same(read.table.names, [...theirs.keys()], `${name}: columns`);
    const wrong = read.table.names.filter((column) => !same(cells(read.table, column), theirs.get(column) ?? []));
    t.same(wrong, [], `${name}: every cell of every column`);
  }
});

t.test('the two-thread read (FOLDSEAL_THREADS=2) decodes the same cells', async (t) => {
  const before = process.env.FOLDSEAL_THREADS;
  process.env.FOLDSEAL_THREADS = '2';
  const thread = startRowThread({ parquet: true });
  t.teardown(async () => {
    await thread.close();
    if (before === undefined) delete process.env.FOLDSEAL_THREADS;
    else process.env.FOLDSEAL_THREADS = before;
  });
  for (const small of [false, true]) {
    const plain = write({ v2: false, dictionary: true, small, codec: pq.Compression.SNAPPY });
    const shared = new Uint8Array(new SharedArrayBuffer(plain.length));
    shared.set(plain);
    const oneRead = await readParquet(plain, 'one');
    const one = oneRead.problem ? undefined : oneRead.table;
    const bits = (x: ColumnTable | undefined) => x && Buffer.from(x.numbers.buffer, x.numbers.byteOffset, x.numbers.byteLength);
    // Many reads: the threads' order varies from read to read. (A race once let this thread's
    // first touch of the block zero values the other had already written; it showed in one
    // read of a few hundred, more often on a busy machine.)
    const differing: number[] = [];
    for (let i = 0; i < 40; i++) {
      const twoRead = await readParquet(shared, 'two', {}, thread);
      const two = twoRead.problem ? undefined : twoRead.table;
      if (i === 0) {
        t.ok(two && two.numbers.buffer instanceof SharedArrayBuffer, 'decoded into shared memory');
        t.same(two?.columns, one?.columns, 'the same texts and slots');
      }
      if (!(one && two && bits(one)?.equals(bits(two) as Buffer))) differing.push(i);
    }
    t.same(differing, [], 'the same numbers, bit for bit, in each of 40 reads');
  }
  // A broken file is the same problem whichever thread meets the break: with two numeric columns
  // broken, the first in file order is reported, on one thread and on two, every time.
  const broken = write({ v2: false, dictionary: false, small: false, codec: pq.Compression.SNAPPY });
  const footer = readFooter(broken);
  for (const c of [3, 6]) {
    const { start } = footer.groups[0].chunks[c];
    broken.fill(0xff, start + 40, start + 200);
  }
  const shared = new Uint8Array(new SharedArrayBuffer(broken.length));
  shared.set(broken);
  const alone = await readParquet(broken, 'b.parquet', { file: 'p.yaml' });
  t.match(alone.problem?.message, /file b\.parquet is a Parquet file foldseal cannot read/);
  const messages = new Set<string | undefined>();
  for (let i = 0; i < 10; i++) messages.add((await readParquet(shared, 'b.parquet', { file: 'p.yaml' }, thread)).problem?.message);
  t.same([...messages], [alone.problem?.message], 'the same message in each of 10 two-thread reads');
  t.match(alone.problem?.message, /column holes/, 'the first broken column in file order');
});

t.test('snappy: the format description, by hand, and its errors', async (t) => {
  const bytes = (...xs: (number | string)[]) =>
    Uint8Array.from(xs.flatMap((x) => (typeof x === 'string' ? [...Buffer.from(x, 'latin1')] : [x])));
  const text = (u: Uint8Array) => Buffer.from(u).toString('latin1');
  // Built by hand from format_description.txt: a varint length; a literal tag (length - 1) << 2;
  // a copy with a 1-byte offset (tag 01, length - 4 in bits 2-4) that overlaps its own output.
  t.equal(text(unsnappy(bytes(17, (6 - 1) << 2, 'hello ', 1 | ((11 - 4) << 2), 6), new Uint8Array(17))), 'hello hello hello');
  // A 2-byte-offset copy (tag 10, length - 1 in bits 2-7), then a 4-byte-offset one (tag 11).
  t.equal(
    text(unsnappy(bytes(12, (4 - 1) << 2, 'abcd', 2 | ((4 - 1) << 2), 4, 0, 3 | ((4 - 1) << 2), 8, 0, 0, 0), new Uint8Array(12))),
    'abcdabcdabcd',
  );
  // A literal longer than 60 bytes takes its length from the next byte (tag 60 << 2); copies of
  // 16 bytes or more that do not overlap move as one block.
  const long = 'x'.repeat(40) + 'y'.repeat(40);
  t.equal(text(unsnappy(bytes(100, 60 << 2, 80 - 1, long, 2 | ((20 - 1) << 2), 40, 0), new Uint8Array(100))), long + 'y'.repeat(20));
  for (const [why, input, size] of [
    ['declared size', bytes(5, 0, 'a'), 1],
    ['offset 0', bytes(5, 0, 'a', 1, 0), 5],
    ['offset before the start', bytes(5, 0, 'a', 1, 2), 5],
    ['literal past the end', bytes(3, 8, 'ab'), 3],
    ['short output', bytes(3, 4, 'ab'), 3],
    ['cut copy', bytes(5, 0, 'a', 2, 1), 5],
    ['cut length', bytes(0x80), 0],
  ] as const)
    t.throws(() => unsnappy(input, new Uint8Array(size)), /snappy/, why);
});

t.test('numbers checked while decoding: a clean file skips the scan, a bad number is still reported', async (t) => {
  const roles = { id: 'id', label: 'diagnosis', missing: ['', 'NA', 'NaN'] };
  const make = (value: number) => {
    const columns = {
      id: body.map((r) => r[0]),
      diagnosis: body.map((r) => r[1]),
      a: Float64Array.from(body, (r, i) => (i === 7 ? value : num(r, 2))),
    };
    const props = new pq.WriterPropertiesBuilder().setCompression(pq.Compression.SNAPPY).build();
    return pq.writeParquet(pq.Table.fromIPCStream(arrow.tableToIPC(arrow.tableFromArrays(columns), 'stream')), props);
  };
  for (const [value, inRange, code] of [
    [1.5, true, undefined],
    [1e200, false, 'data-out-of-range'],
    [1e-200, false, 'data-out-of-range'],
    [Number.NaN, false, 'data-missing'],
  ] as const) {
    const read = await readParquet(make(value), 'v.parquet');
    t.equal(read.problem ? undefined : read.table.inRange, inRange, `${value}: checked while decoding`);
    const built = read.problem
      ? undefined
      : tableFromLayout(read.table, 'v.parquet', roles, undefined, 'samples-in-rows', undefined, () => undefined);
    if (code === undefined) t.same(built?.problems, [], `${value}: no problem`);
    else if (code === 'data-missing')
      t.ok(built?.table?.hasMissing && Number.isNaN(built.table.X.data[7 * built.table.X.cols]), `${value}: a missing value`);
    else
      t.ok(
        built?.problems.some((q) => q.code === code),
        `${value}: reported`,
      );
  }
});

t.test('thrift compact protocol: a struct built by hand from the specification', async (t) => {
  // Field headers are (id delta << 4) | type; i32 values are zigzag varints; a field id that is
  // not a small delta follows its header (type only) as a zigzag i16.
  const bytes = Uint8Array.from([
    0x15,
    0x06, // field 1, i32 3
    0x15,
    0x01, // field 2, i32 -1
    0x3c,
    0x15,
    0xc8,
    0x01,
    0x00, // field 5, struct { field 1: i32 100 }
    0x19,
    0x35,
    0x02,
    0x04,
    0x06, // field 6, list of 3 i32: 1, 2, 3
    0x18,
    0x02,
    0x61,
    0x62, // field 7, binary "ab" (skipped: its length)
    0x11, // field 8, true
    0x05,
    0x28,
    0x02, // field 20 (long form), i32 1
    0x00,
  ]);
  const reader = { view: new DataView(bytes.buffer), offset: 0 };
  t.same(readStruct(reader), { 1: 3, 2: -1, 5: { 1: 100 }, 6: [1, 2, 3], 7: 2, 8: true, 20: 1 });
  t.equal(reader.offset, bytes.length, 'stops after the stop byte');
  t.throws(() => readStruct({ view: new DataView(bytes.buffer, 0, 7), offset: 0 }), /ends early/, 'cut short');
  t.throws(() => readStruct({ view: new DataView(Uint8Array.of(0x1d, 0).buffer), offset: 0 }), /unknown Thrift type/);
  const asText = { view: new DataView(bytes.buffer), offset: 0 };
  t.equal(readStruct(asText, true)[7], 'ab', 'binaries read as text when asked');
  // A list that claims more elements than bytes are left, and structs nested past any real file.
  t.throws(() => readStruct({ view: new DataView(Uint8Array.of(0x19, 0xf5, 0xff, 0xff, 0x03, 0).buffer), offset: 0 }), /ends early/);
  const deep = Uint8Array.from({ length: 200 }, (_, i) => (i < 100 ? 0x1c : 0));
  t.throws(() => readStruct({ view: new DataView(deep.buffer), offset: 0 }, false, 'the footer'), /the footer nests deeper than 64/);
});

t.test("the footer: what foldseal reads of it equals the general reader's metadata", async (t) => {
  const { parquetMetadata } = await import('hyparquet');
  for (const layout of layouts) {
    const bytes = write(layout);
    const ours = readFooter(bytes);
    const theirs = parquetMetadata(bytes);
    const name = `${layout.v2 ? 'v2' : 'v1'} ${layout.dictionary ? 'dictionary' : 'plain'} ${layout.small ? 'small' : 'one'} ${layout.codecName}`;
    t.equal(ours.rows, Number(theirs.num_rows), `${name}: rows`);
    t.same(
      ours.schema.map((s) => [s.name, s.type, s.repetition, s.children, s.logical, s.converted]),
      theirs.schema.map((s) => [s.name, s.type, s.repetition_type, s.num_children ?? 0, s.logical_type?.type, s.converted_type]),
      `${name}: schema`,
    );
    t.same(
      ours.groups.map((g) => [g.rows, g.chunks.map((c) => [c.path, c.codec, c.start, c.size, c.elsewhere])]),
      theirs.row_groups.map((g) => [
        Number(g.num_rows),
        g.columns.map((c) => {
          const m = c.meta_data!;
          return [
            m.path_in_schema,
            m.codec,
            Number(m.dictionary_page_offset ?? m.data_page_offset),
            Number(m.total_compressed_size),
            false,
          ];
        }),
      ]),
      `${name}: row groups and column chunks`,
    );
  }
});

t.test('a broken footer is a problem with a reason, never a crash', async (t) => {
  const good = write({ v2: false, dictionary: true, small: false, codec: pq.Compression.SNAPPY });
  const n = good.length;
  const footerLength = new DataView(good.buffer, good.byteOffset + n - 8, 4).getUint32(0, true);
  const withLength = (length: number) => {
    const b = Uint8Array.from(good);
    new DataView(b.buffer).setUint32(n - 8, length, true);
    return b;
  };
  const cut = Uint8Array.from(good);
  cut.fill(0, n - 8 - footerLength, n - 8 - footerLength + 40);
  const cases: [string, Uint8Array, RegExp][] = [
    ['a length past the file', withLength(n), /the footer length \(\d+ bytes\) does not fit/],
    ['a zero length', withLength(0), /does not fit/],
    ['a footer cut short', withLength(20), /the footer (ends early|lacks|has)/],
    ['a footer overwritten', cut, /the footer/],
  ];
  for (const [why, bytes, message] of cases) {
    t.throws(() => readFooter(bytes), message, why);
    const read = await readParquet(bytes, 'f.parquet');
    t.match(read.problem?.message, /^file f\.parquet is a Parquet file foldseal cannot read: the footer/, why);
  }
});
