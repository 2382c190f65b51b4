#!/usr/bin/env node
// Reading speed: the same seeded 100,000 × 50 table as CSV and as Parquet (written by Apache
// Arrow's Rust implementation through parquet-wasm, snappy pages), timed as whole `foldseal
// validate` processes (read, hash, check, assign folds), median of 5 alternating runs. Prints
// parquet / csv (below 1: the Parquet file reads faster).
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { seededRandom } from '../scripts/seeded-random.mjs';

const require = createRequire(import.meta.url);
const pq = require('parquet-wasm/node');
const arrow = require('apache-arrow');
const here = new URL('.', import.meta.url).pathname;
const out = join(here, 'out', 'parquet');
mkdirSync(out, { recursive: true });
// The launcher users run (package.json's bin).
const bin = join(here, '..', 'bin', 'foldseal.cjs');

const rows = 100_000;
const cols = 50;
const rand = seededRandom(15);
const normal = () => Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
const ids = Array.from({ length: rows }, (_, r) => `s${r + 1}`);
const labels = Array.from({ length: rows }, () => (rand() < 0.4 ? 'case' : 'control'));
const features = Array.from({ length: cols }, (_, j) =>
  Float64Array.from({ length: rows }, (_, r) => Number((normal() + (j < 10 && labels[r] === 'case' ? 0.8 : 0)).toFixed(4))),
);
const names = features.map((_, j) => `f${j + 1}`);
const lines = [`id,${names.join(',')},class`];
for (let r = 0; r < rows; r++) lines.push(`${ids[r]},${features.map((f) => f[r]).join(',')},${labels[r]}`);
writeFileSync(join(out, 't.csv'), lines.join('\n') + '\n');
const table = arrow.tableFromArrays({ id: ids, ...Object.fromEntries(names.map((n, j) => [n, features[j]])), class: labels });
// The writer's defaults (dictionary pages, snappy), and plain pages (no dictionary), snappy.
const ipc = arrow.tableToIPC(table, 'stream');
const snappy = () => new pq.WriterPropertiesBuilder().setCompression(pq.Compression.SNAPPY);
writeFileSync(join(out, 't.parquet'), pq.writeParquet(pq.Table.fromIPCStream(ipc), snappy().build()));
writeFileSync(join(out, 't.plain.parquet'), pq.writeParquet(pq.Table.fromIPCStream(ipc), snappy().setDictionaryEnabled(false).build()));
const kinds = ['csv', 'parquet', 'plain.parquet'];
for (const ext of kinds) {
  const sha = createHash('sha256')
    .update(readFileSync(join(out, `t.${ext}`)))
    .digest('hex');
  writeFileSync(
    join(out, `${ext}.yaml`),
    `foldseal: 1\nname: read-${ext.replace('.', '-')}\ndata: {file: t.${ext}, sha256: "${sha}", id: id, label: class}\n` +
      'split: {rule: stratified-kfold, folds: 10, seed: 1}\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy]\n',
  );
}
// Wall time of a whole process, and its peak resident set (GNU time's %M) kept per file.
const peak = {};
const time = (ext) => {
  const start = process.hrtime.bigint();
  const r = spawnSync('/usr/bin/time', ['-f', 'peak-kb %M', process.execPath, bin, 'validate', join(out, `${ext}.yaml`)], {
    encoding: 'utf8',
  });
  if (r.status !== 0) throw new Error(r.stderr);
  peak[ext] = Math.max(peak[ext] ?? 0, Number(/peak-kb (\d+)/.exec(r.stderr)?.[1] ?? Number.NaN) / 1024);
  return Number(process.hrtime.bigint() - start) / 1e9;
};
const t = Object.fromEntries(kinds.map((k) => [k, []]));
const runs = Number(process.argv[2] ?? 5);
for (let i = 0; i < runs; i++) for (const ext of kinds) t[ext].push(time(ext));
const median = (xs) => [...xs].sort((a, b) => a - b)[xs.length >> 1];
const size = (ext) => (readFileSync(join(out, `t.${ext}`)).length / 1e6).toFixed(1);
console.log(
  `100,000 × 50, foldseal validate (median of ${runs}): csv ${median(t.csv).toFixed(2)} s (${size('csv')} MB; peak RSS ${peak.csv.toFixed(0)} MiB)`,
);
for (const [ext, what] of [
  ['parquet', 'dictionary pages (the writer default), snappy'],
  ['plain.parquet', 'plain pages, snappy'],
])
  console.log(
    `  parquet, ${what}: ${median(t[ext]).toFixed(2)} s (${size(ext)} MB; peak RSS ${peak[ext].toFixed(0)} MiB), ` +
      `ratio parquet / csv ${(median(t[ext]) / median(t.csv)).toFixed(2)}`,
  );
