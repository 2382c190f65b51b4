// Parquet files written by an independent, authoritative implementation — Apache Arrow's Rust
// Parquet writer, through the parquet-wasm package (devDependency) and apache-arrow for the
// tables — read by foldseal through hyparquet. Reference: the same table as CSV (scikit-learn's
// bundled breast-cancer table, whose CSV run is held to scikit-learn in test/reference/): the
// Parquet run must give byte-identical predictions. (Debian's python3-pandas cannot read Parquet:
// Debian packages neither pyarrow nor fastparquet.)
import { readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import t from 'tap';
import { cli, referenceTable, sha256, tempDir } from '../helpers.js';
import { isParquet, readParquet } from '../../src/io/parquet.js';
import { tableFromLayout } from '../../src/table/load.js';

const roles = { id: 'id', label: 'diagnosis', missing: ['', 'NA', 'NaN'] };

const require = createRequire(import.meta.url);
const pq = require('parquet-wasm/node');
const arrow = require('apache-arrow');

const { csv, header, body } = referenceTable('breast-cancer.csv');

function parquet(compression: number, options: { nulls?: boolean; dictionary?: boolean } = {}): Uint8Array {
  const columns: Record<string, unknown> = {};
  header.forEach((name, c) => {
    if (name === 'id' || name === 'diagnosis') columns[name] = body.map((r) => r[c]);
    else if (options.nulls && c === 3)
      columns[name] = arrow.vectorFromArray(
        body.map((r, i) => (i % 50 === 7 ? null : Number(r[c]))),
        new arrow.Float64(),
      );
    else columns[name] = Float64Array.from(body, (r) => Number(r[c]));
  });
  const table = arrow.tableFromArrays(columns);
  let props = new pq.WriterPropertiesBuilder().setCompression(compression);
  if (options.dictionary === false) props = props.setDictionaryEnabled(false);
  return pq.writeParquet(pq.Table.fromIPCStream(arrow.tableToIPC(table, 'stream')), props.build());
}

const protocol = (file: string, bytes: Uint8Array | string, extra = '') =>
  `foldseal: 1\nname: bc\ndata: {file: ${file}, sha256: "${sha256(bytes)}", id: id, label: diagnosis, positive: malignant}\n` +
  `split: {rule: stratified-kfold, folds: 10, seed: 1993}\n${extra}preprocess: [standardize, {select: {top: 10, by: f-test}}]\n` +
  'model: {kind: gaussian-nb}\nmetrics: [accuracy, roc-auc, log-loss]\n';

t.test('Parquet (snappy, gzip, Brotli, uncompressed; dictionary or plain pages) reads as its CSV does', async (t) => {
  const csvTable = tableFromLayout(Buffer.from(csv), 'bc.csv', roles, undefined, 'samples-in-rows', undefined, () => undefined).table!;
  for (const [name, codec, dictionary] of [
    ['snappy', pq.Compression.SNAPPY, true],
    ['gzip', pq.Compression.GZIP, true],
    ['brotli', pq.Compression.BROTLI, false],
    ['uncompressed', pq.Compression.UNCOMPRESSED, false],
  ] as const) {
    const bytes = parquet(codec, { dictionary });
    t.ok(isParquet(bytes), `${name}: recognized by its magic bytes`);
    const read = await readParquet(bytes, name);
    const table = read.problem
      ? undefined
      : tableFromLayout(read.table, name, roles, undefined, 'samples-in-rows', undefined, () => undefined).table;
    t.same(table?.ids, csvTable.ids, `${name}: ids`);
    t.same(table?.featureNames, csvTable.featureNames, `${name}: features`);
    t.ok(
      table && Buffer.compare(Buffer.from(table.X.data.buffer), Buffer.from(csvTable.X.data.buffer)) === 0,
      `${name}: every number bit for bit`,
    );
    t.same(table?.labels, csvTable.labels, `${name}: labels`);
  }
  // End to end through the binary, under a name that does not say Parquet: the CSV run's predictions.
  const bytes = parquet(pq.Compression.SNAPPY);
  const dir = tempDir({ 'bc.csv': csv, 'csv.yaml': protocol('bc.csv', csv), 'bc.data': bytes, 'pq.yaml': protocol('bc.data', bytes) });
  for (const name of ['csv', 'pq']) t.equal((await cli(['run', `${name}.yaml`, '--out', name], dir)).code, 0);
  t.equal(readFileSync(join(dir, 'pq', 'predictions.csv'), 'utf8'), readFileSync(join(dir, 'csv', 'predictions.csv'), 'utf8'));
  // apply reads a Parquet table of rows as it reads the CSV.
  t.equal((await cli(['apply', 'pq', 'bc.data', '--out', 'from-pq.csv'], dir)).code, 0);
  t.equal((await cli(['apply', 'pq', 'bc.csv', '--out', 'from-csv.csv'], dir)).code, 0);
  t.equal(readFileSync(join(dir, 'from-pq.csv'), 'utf8'), readFileSync(join(dir, 'from-csv.csv'), 'utf8'));
  // init writes a protocol for a Parquet file that validates as is.
  const init = await cli(['init', 'bc.data', '--id', 'id', '--label', 'diagnosis', '--out', 'init.yaml'], dir);
  t.equal(init.code, 0, init.stderr);
  t.match(init.stderr, 'wrote init.yaml (569 rows, 2 classes, 30 features)');
});

t.test('null cells are missing values: an impute step is needed, as for empty CSV cells', async (t) => {
  const bytes = parquet(pq.Compression.SNAPPY, { nulls: true });
  const dir = tempDir({ 'bc.parquet': bytes, 'p.yaml': protocol('bc.parquet', bytes) });
  const r = await cli(['validate', 'p.yaml'], dir);
  t.equal(r.code, 1);
  t.match(r.stderr, /missing/);
  // The same nulls as empty CSV cells, imputed: the same predictions.
  const holes =
    [header.join(','), ...body.map((row, i) => row.map((v, c) => (c === 3 && i % 50 === 7 ? '' : v)).join(','))].join('\n') + '\n';
  writeFileSync(join(dir, 'holes.csv'), holes);
  const impute = (p: string) => p.replace('preprocess: [', 'preprocess: [{impute: {by: median}}, ');
  writeFileSync(join(dir, 'q.yaml'), impute(protocol('bc.parquet', bytes)));
  writeFileSync(join(dir, 'c.yaml'), impute(protocol('holes.csv', holes)));
  t.equal((await cli(['run', 'q.yaml', '--out', 'q'], dir)).code, 0);
  t.equal((await cli(['run', 'c.yaml', '--out', 'c'], dir)).code, 0);
  t.equal(readFileSync(join(dir, 'q', 'predictions.csv'), 'utf8'), readFileSync(join(dir, 'c', 'predictions.csv'), 'utf8'));
});

t.test('an unsupported codec or a broken file is a located error', async (t) => {
  const zstd = parquet(pq.Compression.ZSTD);
  const broken = Uint8Array.from(parquet(pq.Compression.SNAPPY));
  broken.fill(7, 200, 4000);
  const dir = tempDir({
    'z.parquet': zstd,
    'b.parquet': broken,
    'z.yaml': protocol('z.parquet', zstd),
    'b.yaml': protocol('b.parquet', broken),
  });
  const z = await cli(['validate', 'z.yaml'], dir);
  t.equal(z.code, 1);
  t.match(z.stderr, /z\.yaml:3:\d+: error: file z\.parquet is a Parquet file foldseal cannot read: .*/);
  t.match(z.stderr, /hint: write it with snappy, gzip, Brotli or no compression/);
  const b = await cli(['validate', 'b.yaml'], dir);
  t.equal(b.code, 1);
  t.match(b.stderr, /error: file b\.parquet is a Parquet file foldseal cannot read/);
  t.notMatch(b.stderr + z.stderr, /\n\s+at /, 'no stack trace');
});
