#!/usr/bin/env node
// Logistic regression: by default 200,000 rows × 50 features, 10-fold, standardize in the folds; the
// issue's case is `node bench/logistic.mjs 5000 200 5`.
// Times `foldseal run` (whole process) and scikit-learn's fits on the same exported folds, and
// prints the largest out-of-fold probability difference. Not part of npm test.
//   node bench/logistic.mjs [rows] [features] [folds] [runs]
// foldseal and the reference (lbfgs, its default tolerance) run alternately `runs` times (default 5),
// whole processes; medians are compared.
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = fileURLToPath(new URL('.', import.meta.url));
const out = join(here, 'out', 'logistic');
mkdirSync(out, { recursive: true });
const [rows = 200000, features = 50, folds = 10, runs = 5] = process.argv.slice(2).map(Number);
let s = 20261202;
const rnd = () => {
  s = (s * 1103515245 + 12345) % 2147483648;
  return s / 2147483648;
};
const gauss = () => Math.sqrt(-2 * Math.log(rnd() + 1e-12)) * Math.cos(2 * Math.PI * rnd());
const lines = ['id,label,' + Array.from({ length: features }, (_, j) => `f${j}`).join(',')];
for (let i = 0; i < rows; i++) {
  const y = rnd() < 0.5 ? 1 : 0;
  const cells = Array.from({ length: features }, (_, j) => (gauss() * (1 + j / 10) + (j < 5 ? y * 0.8 : 0) + j).toFixed(4));
  lines.push(`r${i},${y ? 'b' : 'a'},${cells.join(',')}`);
}
const data = join(out, 'tall.csv');
writeFileSync(data, lines.join('\n') + '\n');
const sha = createHash('sha256').update(readFileSync(data)).digest('hex');
writeFileSync(
  join(out, 'tall.yaml'),
  `foldseal: 1\nname: logistic-tall\ndata: {file: tall.csv, sha256: "${sha}", id: id, label: label}\nsplit: {rule: ` +
    `stratified-kfold, folds: ${folds}, seed: 1}\npreprocess: [standardize]\nmodel: {kind: logistic, options: {l2: 1}}\nmetrics: ` +
    `[accuracy, roc-auc, log-loss]\n`,
);
// The launcher users run (package.json's bin).
const bin = join(here, '..', 'bin', 'foldseal.cjs');
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const foldseal = () => {
  const t0 = performance.now();
  const timed = spawnSync(
    '/usr/bin/time',
    ['-f', 'peak-kb %M', process.execPath, bin, 'run', join(out, 'tall.yaml'), '--out', join(out, 'res'), '--force'],
    { encoding: 'utf8' },
  );
  if (timed.status !== 0) throw new Error(timed.stderr);
  return { s: (performance.now() - t0) / 1000, mb: Number(/peak-kb (\d+)/.exec(timed.stderr)?.[1] ?? Number.NaN) / 1024 };
};
foldseal();
execFileSync(process.execPath, [bin, 'folds', join(out, 'tall.yaml'), '--out', join(out, 'folds.csv')], { stdio: 'ignore' });
// Each reference call is also timed as a whole process (start-up, reading the CSV, the fits),
// which is what foldseal's time is.
const ref = (tol, solver = 'lbfgs') => {
  const start = performance.now();
  const timed = spawnSync(
    '/usr/bin/time',
    [
      '-f',
      'peak-kb %M',
      '/usr/bin/python3',
      join(here, 'logistic_reference.py'),
      data,
      join(out, 'folds.csv'),
      join(out, 'res', 'predictions.csv'),
      String(tol),
      solver,
    ],
    { encoding: 'utf8' },
  );
  if (timed.status !== 0) throw new Error(timed.stderr);
  const [fits, diff] = timed.stdout.trim().split(' ');
  const mb = Number(/peak-kb (\d+)/.exec(timed.stderr)?.[1] ?? Number.NaN) / 1024;
  return [fits, diff, (performance.now() - start) / 1000, mb];
};
const ours = [];
const theirs = [];
const theirMb = [];
let fast;
for (let r = 0; r < runs; r++) {
  ours.push(foldseal());
  fast = ref(1e-4);
  theirs.push(fast[2]);
  theirMb.push(fast[3]);
}
const oursS = median(ours.map((o) => o.s));
const peakMb = median(ours.map((o) => o.mb));
const theirsS = median(theirs);
const [tight, tightDiff] = ref(1e-10);
const [exact, exactDiff, exactWhole] = ref(1e-10, 'newton-cholesky');
console.log(`${rows} × ${features}, ${folds}-fold, standardize + logistic (l2 1); medians of ${runs} alternating runs`);
console.log(`foldseal run (whole process): ${oursS.toFixed(2)} s (peak RSS ${peakMb.toFixed(0)} MiB)`);
console.log(
  `reference fits, lbfgs tol 1e-4 (its default): ${fast[0]} s (${theirsS.toFixed(2)} s as a whole process, peak RSS ` +
    `${median(theirMb).toFixed(0)} MiB), max |Δp| ${fast[1]}`,
);
console.log(`reference fits, lbfgs tol 1e-10: ${tight} s, max |Δp| ${tightDiff}`);
console.log(
  `reference fits, newton-cholesky tol 1e-10 (converged): ${exact} s (${exactWhole.toFixed(2)} s as a whole process), max |Δp| ${exactDiff}`,
);
console.log(
  `ratio foldseal / reference, whole processes (lbfgs tol 1e-4): ${(oursS / theirsS).toFixed(2)}; ` +
    `against its fits alone (lbfgs tol 1e-10): ${(oursS / Number(tight)).toFixed(2)}`,
);
