#!/usr/bin/env node
// Nested tuning: `foldseal run` of a protocol with a tuned `select.top` (4 values) and a tuned
// gaussian-nb `variance-floor` (3 values), 5 outer × 5 inner folds, on a seeded table of
// 200 rows × 20,000 features (2 classes, 40 informative), against scikit-learn's GridSearchCV
// inside each outer fold on exactly foldseal's outer and inner folds (nested_reference.py), with
// one job and with as many jobs as cores. Whole processes, median of 3 paired runs. Prints both
// sides' chosen candidates and foldseal / reference (lower is better; target ≤ 0.3).
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { seededRandom } from '../scripts/seeded-random.mjs';

const here = new URL('.', import.meta.url).pathname;
const out = join(here, 'out', 'nested');
mkdirSync(out, { recursive: true });
// The launcher users run (package.json's bin).
const bin = join(here, '..', 'bin', 'foldseal.cjs');
const python = '/usr/bin/python3';
const tops = [10, 50, 100, 500];
const floors = [1e-9, 1e-6, 1e-3];

const rand = seededRandom(18);
const normal = () => Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
const rows = 200;
const cols = 20000;
const lines = ['id,' + Array.from({ length: cols }, (_, j) => `g${j + 1}`).join(',') + ',class'];
for (let r = 0; r < rows; r++) {
  const c = r % 2;
  const cells = Array.from({ length: cols }, (_, j) => (normal() + (j < 40 ? 0.6 * c : 0)).toFixed(3));
  lines.push(`s${String(r + 1).padStart(3, '0')},${cells.join(',')},${c ? 'case' : 'control'}`);
}
const data = join(out, 'nested-200-x20000.csv');
writeFileSync(data, lines.join('\n') + '\n');
const sha = createHash('sha256').update(readFileSync(data)).digest('hex');
const protocol = join(out, 'nested.yaml');
writeFileSync(
  protocol,
  `foldseal: 1\nname: bench-nested\ndata: {file: nested-200-x20000.csv, sha256: "${sha}", id: id, label: class}\n` +
    `split: {rule: stratified-kfold, folds: 5, seed: 18}\n` +
    `preprocess: [standardize, {select: {top: [${tops.join(', ')}], by: f-test}}]\n` +
    `model: {kind: gaussian-nb, options: {variance-floor: [${floors.join(', ')}]}}\n` +
    `tune: {split: {rule: stratified-kfold, folds: 5}, metric: roc-auc, prefer: [{select.top: smallest}, {model.variance-floor: largest}]}\n` +
    `metrics: [accuracy, roc-auc]\n`,
);
const folds = join(out, 'nested.folds.csv');
const inner = join(out, 'nested.inner.csv');
execFileSync(process.execPath, [bin, 'folds', protocol, '--out', folds], { stdio: 'ignore' });
execFileSync(process.execPath, [bin, 'folds', protocol, '--inner', '--out', inner], { stdio: 'ignore' });

function once(cmd, args) {
  const start = process.hrtime.bigint();
  const r = spawnSync(cmd, args, { encoding: 'utf8', maxBuffer: 1 << 26 });
  const seconds = Number(process.hrtime.bigint() - start) / 1e9;
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed:\n${r.stderr}`);
  return { seconds, stdout: r.stdout };
}
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

const jobs = Math.max(2, availableParallelism());
const refArgs = (n) => [
  join(here, 'nested_reference.py'),
  data,
  folds,
  inner,
  tops.join(','),
  floors.join(','),
  `${n}`,
  join(out, 'ref-oof.csv'),
];
const sides = {
  foldseal: () => once(process.execPath, [bin, 'run', protocol, '--out', join(out, 'results'), '--force']),
  'reference, 1 job': () => once(python, refArgs(1)),
  [`reference, ${jobs} jobs`]: () => once(python, refArgs(jobs)),
};
const times = Object.fromEntries(Object.keys(sides).map((k) => [k, []]));
const last = {};
for (let i = 0; i < 3; i++) {
  for (const [k, f] of Object.entries(sides)) {
    last[k] = f();
    times[k].push(last[k].seconds);
  }
}

const results = JSON.parse(readFileSync(join(out, 'results', 'results.json'), 'utf8'));
const ours = results.tuning.folds.map((f) => `${f.fold} ${f.chosen['select.top']} ${f.chosen['model.variance-floor']}`);
const theirs = last['reference, 1 job'].stdout.trim().split('\n');
console.log(`200 × 20,000, 5 outer × 5 inner folds, 4 × 3 candidates (median of 3 paired runs)`);
console.log(`  chosen (fold top floor): foldseal ${ours.join('; ')}`);
console.log(
  `                           reference ${theirs.join('; ')}  ${ours.join() === theirs.map((l) => l.replace(/ (\S+)$/, (_, v) => ` ${Number(v)}`)).join() ? 'same' : 'DIFFERENT'}`,
);
const pred = readFileSync(join(out, 'results', 'predictions.csv'), 'utf8')
  .trim()
  .split('\n')
  .slice(1);
const ref = new Map(
  readFileSync(join(out, 'ref-oof.csv'), 'utf8')
    .trim()
    .split('\n')
    .slice(1)
    .map((l) => [l.split(',')[0], l.split(',')]),
);
let worst = 0;
for (const l of pred) {
  const c = l.split(',');
  worst = Math.max(worst, Math.abs(Number(c[5]) - Number(ref.get(c[0])[1])));
}
console.log(`  largest out-of-fold probability difference: ${worst.toExponential(2)}`);
const mine = median(times.foldseal);
console.log(`  foldseal ${mine.toFixed(2)} s`);
for (const k of Object.keys(sides).slice(1)) {
  const t = median(times[k]);
  console.log(`  ${k} ${t.toFixed(2)} s, ratio ${(mine / t).toFixed(2)}`);
}
