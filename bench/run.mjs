#!/usr/bin/env node
// Times `foldseal run` against the reference library on the same generated files, in the same
// run, and prints the ratio foldseal / reference (lower is better; targets: (a) ≤ 0.25, (b) ≤ 0.3, (c) ≤ 0.4; (d) is the
// peak-memory case). Each side is a
// whole process (start-up, reading the file, the folds, writing predictions); best of 3.
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const here = new URL('.', import.meta.url).pathname;
const out = join(here, 'out');
if (!existsSync(join(out, 'c.yaml'))) execFileSync(process.execPath, [join(here, 'generate.mjs')], { stdio: 'inherit' });
if (!existsSync(join(out, 'd.yaml'))) execFileSync(process.execPath, [join(here, 'generate.mjs'), 'd'], { stdio: 'inherit' });
// The launcher users run (package.json's bin).
const bin = join(here, '..', 'bin', 'foldseal.cjs');
const python = '/usr/bin/python3';

/** Best wall time of 3 whole-process runs, and the peak resident set of the best run (GNU time's %M). */
function time(cmd, args) {
  let best = { s: Infinity, mb: 0 };
  for (let i = 0; i < 3; i++) {
    const start = process.hrtime.bigint();
    const r = spawnSync('/usr/bin/time', ['-f', 'peak-kb %M', cmd, ...args], { encoding: 'utf8' });
    const seconds = Number(process.hrtime.bigint() - start) / 1e9;
    if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed:\n${r.stderr}`);
    const kb = Number(/peak-kb (\d+)/.exec(r.stderr)?.[1] ?? Number.NaN);
    if (seconds < best.s) best = { s: seconds, mb: kb / 1024 };
  }
  return best;
}

const scratch = mkdtempSync(join(tmpdir(), 'foldseal-bench-'));
const rows = [];
// `node bench/run.mjs a c` runs only those cases.
const only = process.argv.slice(2);
for (const [name, file, label] of [
  ['a', 'a-100k-x50.csv', '100,000 × 50, stratified 10-fold, gaussian-nb'],
  ['b', 'b-200-x20000.csv', '200 × 20,000, 10 × 5-fold, standardize + top-100 f-test + gaussian-nb'],
  ['c', 'c-1m-x20.csv', '1,000,000 × 20, stratified 5-fold, gaussian-nb'],
  ['d', 'd-1m-x50.csv', '1,000,000 × 50, stratified 5-fold, gaussian-nb (memory: ≤ 1.5 × the 400 MB matrix + 100 MB = 700 MB = 667.6 MiB)'],
].filter(([name]) => only.length === 0 || only.includes(name))) {
  const ours = time(process.execPath, [bin, 'run', join(out, `${name}.yaml`), '--out', join(scratch, name), '--force']);
  const theirs = time(python, [join(here, 'reference.py'), name, join(out, file), join(scratch, `${name}-ref.csv`)]);
  rows.push({ name, label, ours, theirs, ratio: ours.s / theirs.s });
}
rmSync(scratch, { recursive: true, force: true });
for (const r of rows)
  console.log(
    `(${r.name}) ${r.label}: foldseal ${r.ours.s.toFixed(2)} s (peak RSS ${r.ours.mb.toFixed(0)} MiB), ` +
      `reference ${r.theirs.s.toFixed(2)} s (${r.theirs.mb.toFixed(0)} MiB), ratio ${r.ratio.toFixed(2)}`,
  );
