#!/usr/bin/env node
// k nearest neighbours on 20,000 rows × 30 features, 5-fold, k = 15: `foldseal run` against
// scikit-learn's brute-force KNeighborsClassifier on the same folds, whole processes, median of 3.
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { seededRandom } from '../scripts/seeded-random.mjs';

const here = new URL('.', import.meta.url).pathname;
const out = join(here, 'out', 'knn');
mkdirSync(out, { recursive: true });
// The launcher users run (package.json's bin).
const bin = join(here, '..', 'bin', 'foldseal.cjs');
const rand = seededRandom(21);
const normal = () => Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
const lines = ['id,label,' + Array.from({ length: 30 }, (_, j) => `f${j}`).join(',')];
for (let i = 0; i < 20_000; i++) {
  const y = rand() < 0.5 ? 1 : 0;
  lines.push(`r${i},${y ? 'b' : 'a'},${Array.from({ length: 30 }, (_, j) => (normal() + (j < 5 ? 0.7 * y : 0)).toFixed(4)).join(',')}`);
}
const data = join(out, 'k.csv');
writeFileSync(data, lines.join('\n') + '\n');
const sha = createHash('sha256').update(readFileSync(data)).digest('hex');
writeFileSync(
  join(out, 'k.yaml'),
  `foldseal: 1\nname: knn\ndata: {file: k.csv, sha256: "${sha}", id: id, label: label}\nsplit: {rule: stratified-kfold, folds: 5, seed: 2}\n` +
    'model: {kind: knn, options: {k: 15}}\nmetrics: [accuracy, roc-auc]\n',
);
execFileSync(process.execPath, [bin, 'folds', join(out, 'k.yaml'), '--out', join(out, 'folds.csv')], { stdio: 'ignore' });
const timed = (cmd, args) => {
  const r = spawnSync('/usr/bin/time', ['-f', '%e %M', cmd, ...args], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(r.stderr);
  const [s, kb] = r.stderr.trim().split('\n').pop().split(' ').map(Number);
  return { s, mb: kb / 1024, stdout: r.stdout };
};
const runs = { foldseal: [], reference: [] };
let diff = '';
for (let i = 0; i < 3; i++) {
  runs.foldseal.push(timed(process.execPath, [bin, 'run', join(out, 'k.yaml'), '--out', join(out, 'res'), '--force']));
  const ref = timed('/usr/bin/python3', [
    join(here, 'knn_reference.py'),
    data,
    join(out, 'folds.csv'),
    join(out, 'res', 'predictions.csv'),
    '15',
  ]);
  runs.reference.push(ref);
  diff = ref.stdout.trim();
}
const median = (xs) => [...xs].sort((a, b) => a - b)[1];
const f = median(runs.foldseal.map((r) => r.s));
const r = median(runs.reference.map((x) => x.s));
console.log(
  `20,000 × 30, 5-fold, knn k = 15 (median of 3): foldseal ${f.toFixed(2)} s (peak RSS ${median(runs.foldseal.map((x) => x.mb)).toFixed(0)} MiB), ` +
    `reference ${r.toFixed(2)} s (${median(runs.reference.map((x) => x.mb)).toFixed(0)} MiB), ratio ${(f / r).toFixed(2)}; max |Δp| ${diff}`,
);
