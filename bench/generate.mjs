#!/usr/bin/env node
// Writes the benchmark tables (synthetic, seeded) and their protocols into bench/out/:
//   a) 100,000 rows × 50 features, 2 classes  — stratified 10-fold, gaussian-nb
//   b) 200 rows × 20,000 features, 2 classes  — 10 × repeated stratified 5-fold,
//      standardize + top-100 f-test + gaussian-nb
//   c) 1,000,000 rows × 20 features, 2 classes — stratified 5-fold, gaussian-nb
//   d) 1,000,000 rows × 50 features, 2 classes — stratified 5-fold, gaussian-nb (the memory case;
//      a 410 MB CSV, written only by `node bench/generate.mjs d`)
import { createHash } from 'node:crypto';
import { appendFileSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { seededRandom } from '../scripts/seeded-random.mjs';

const out = join(new URL('.', import.meta.url).pathname, 'out');
mkdirSync(out, { recursive: true });

function table(name, rows, cols, informative, seed) {
  const rand = seededRandom(seed);
  const normal = () => Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
  const file = join(out, `${name}.csv`);
  writeFileSync(file, 'id,' + Array.from({ length: cols }, (_, j) => `f${j + 1}`).join(',') + ',class\n');
  // Written in chunks of rows: a million rows as one string would not fit.
  for (let r0 = 0; r0 < rows; r0 += 50_000) {
    const lines = [];
    for (let r = r0; r < Math.min(rows, r0 + 50_000); r++) {
      const c = rand() < 0.4 ? 1 : 0;
      const cells = new Array(cols);
      for (let j = 0; j < cols; j++) cells[j] = (normal() + (j < informative ? 0.8 * c : 0)).toFixed(4);
      lines.push(`s${r + 1},${cells.join(',')},${c ? 'case' : 'control'}`);
    }
    appendFileSync(file, lines.join('\n') + '\n');
  }
  return createHash('sha256').update(readFileSync(file)).digest('hex');
}

if (process.argv[2] === 'd') {
  const d = table('d-1m-x50', 1_000_000, 50, 10, 4);
  writeFileSync(
    join(out, 'd.yaml'),
    `foldseal: 1\nname: bench-d\ndata: {file: d-1m-x50.csv, sha256: "${d}", id: id, label: class}\nsplit: {rule: ` +
      `stratified-kfold, folds: 5, seed: 4}\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy, roc-auc, log-loss]\n`,
  );
  console.log(`wrote ${join(out, 'd.yaml')}`);
  process.exit(0);
}
const a = table('a-100k-x50', 100000, 50, 10, 1);
writeFileSync(
  join(out, 'a.yaml'),
  `foldseal: 1\nname: bench-a\ndata: {file: a-100k-x50.csv, sha256: "${a}", id: id, label: class}\nsplit: {rule: ` +
    `stratified-kfold, folds: 10, seed: 1}\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy, roc-auc, log-loss]\n`,
);
const b = table('b-200-x20000', 200, 20000, 50, 2);
writeFileSync(
  join(out, 'b.yaml'),
  `foldseal: 1\nname: bench-b\ndata: {file: b-200-x20000.csv, sha256: "${b}", id: id, label: class}\nsplit: {rule: ` +
    `stratified-kfold, folds: 5, repeats: 10, seed: 2}\npreprocess: [standardize, {select: {top: 100, by: f-test}}]\nmodel: ` +
    `{kind: gaussian-nb}\nmetrics: [accuracy, roc-auc, log-loss]\n`,
);
const c = table('c-1m-x20', 1_000_000, 20, 5, 3);
writeFileSync(
  join(out, 'c.yaml'),
  `foldseal: 1\nname: bench-c\ndata: {file: c-1m-x20.csv, sha256: "${c}", id: id, label: class}\nsplit: {rule: ` +
    `stratified-kfold, folds: 5, seed: 3}\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy, roc-auc, log-loss]\n`,
);
console.log(`wrote ${out}`);
