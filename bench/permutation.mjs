#!/usr/bin/env node
// Permutation test: `foldseal run` with 1,000 permutations against scikit-learn's
// permutation_test_score on the same seeded table (500 rows × 100 features, 2 classes, 5 of the
// features informative) and the same 5 folds, gaussian-nb. Whole processes, median of 5 paired
// runs; the reference is timed with one job and with as many jobs as cores. Prints
// foldseal / reference (lower is better; target ≤ 0.3).
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { seededRandom } from '../scripts/seeded-random.mjs';

const here = new URL('.', import.meta.url).pathname;
const out = join(here, 'out', 'permutation');
mkdirSync(out, { recursive: true });
// The launcher users run (package.json's bin).
const bin = join(here, '..', 'bin', 'foldseal.cjs');
const python = '/usr/bin/python3';
const permutations = 1000;

const rand = seededRandom(16);
const normal = () => Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
const rows = 500;
const cols = 100;
const lines = ['id,' + Array.from({ length: cols }, (_, j) => `f${j + 1}`).join(',') + ',class'];
for (let r = 0; r < rows; r++) {
  const c = rand() < 0.5 ? 1 : 0;
  const cells = Array.from({ length: cols }, (_, j) => (normal() + (j < 5 ? 0.3 * c : 0)).toFixed(4));
  lines.push(`s${r + 1},${cells.join(',')},${c ? 'case' : 'control'}`);
}
const data = join(out, 'perm-500-x100.csv');
writeFileSync(data, lines.join('\n') + '\n');
const sha = createHash('sha256').update(readFileSync(data)).digest('hex');
const protocol = join(out, 'perm.yaml');
writeFileSync(
  protocol,
  `foldseal: 1\nname: bench-permutation\ndata: {file: perm-500-x100.csv, sha256: "${sha}", id: id, label: class}\n` +
    `split: {rule: stratified-kfold, folds: 5, seed: 16}\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy]\n` +
    `statistics: {permutation: {count: ${permutations}, seed: 17, metric: accuracy}}\n`,
);
const folds = join(out, 'perm.folds.csv');
execFileSync(process.execPath, [bin, 'folds', protocol, '--out', folds], { stdio: 'ignore' });

function once(cmd, args) {
  const start = process.hrtime.bigint();
  const r = spawnSync(cmd, args, { encoding: 'utf8' });
  const seconds = Number(process.hrtime.bigint() - start) / 1e9;
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed:\n${r.stderr}`);
  return { seconds, stdout: r.stdout };
}
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

const jobs = Math.max(2, availableParallelism());
const sides = {
  foldseal: () => once(process.execPath, [bin, 'run', protocol, '--out', join(out, 'results'), '--force']),
  'reference, 1 job': () => once(python, [join(here, 'permutation_reference.py'), data, folds, `${permutations}`, '1']),
  [`reference, ${jobs} jobs`]: () => once(python, [join(here, 'permutation_reference.py'), data, folds, `${permutations}`, `${jobs}`]),
};
const times = Object.fromEntries(Object.keys(sides).map((k) => [k, []]));
const last = {};
for (let i = 0; i < 5; i++) {
  for (const [k, f] of Object.entries(sides)) {
    last[k] = f();
    times[k].push(last[k].seconds);
  }
}

const results = JSON.parse(readFileSync(join(out, 'results', 'results.json'), 'utf8'));
const perm = results.statistics.permutation;
console.log(`500 × 100, 5-fold, gaussian-nb, ${permutations} permutations (median of 5 paired runs)`);
console.log(`  foldseal: observed accuracy ${perm.observed.toFixed(6)}, p = ${perm['p-value'].toFixed(6)}`);
const [refScore, refP] = last['reference, 1 job'].stdout.trim().split(' ');
console.log(`  reference: observed accuracy ${refScore}, p = ${refP} (other permutations, so p differs by chance)`);
const ours = median(times.foldseal);
console.log(`  foldseal ${ours.toFixed(2)} s`);
for (const k of Object.keys(sides).slice(1)) {
  const theirs = median(times[k]);
  console.log(`  ${k} ${theirs.toFixed(2)} s, ratio ${(ours / theirs).toFixed(2)}`);
}
