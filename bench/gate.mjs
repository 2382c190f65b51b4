#!/usr/bin/env node
// The repository gate on a 100,000-row protocol: times `foldseal lock` (first, then again with
// the lock in place) and `foldseal check` as whole processes, median of 3, with peak RSS.
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const here = new URL('.', import.meta.url).pathname;
const out = join(here, 'out', 'gate');
rmSync(out, { recursive: true, force: true });
mkdirSync(out, { recursive: true });
execFileSync('git', ['init', '-q', out]);
// The launcher users run (package.json's bin).
const bin = join(here, '..', 'bin', 'foldseal.cjs');
const lines = ['id,label,a,b,c'];
for (let i = 0; i < 100_000; i++) lines.push(`r${i},${i % 3 ? 'x' : 'y'},${i % 97},${(i * 7) % 13},${(i * 11) % 17}`);
writeFileSync(join(out, 'd.csv'), lines.join('\n') + '\n');
const sha = createHash('sha256')
  .update(readFileSync(join(out, 'd.csv')))
  .digest('hex');
writeFileSync(
  join(out, 'p.yaml'),
  `foldseal: 1\nname: big\ndata: {file: d.csv, sha256: "${sha}", id: id, label: label}\n` +
    'split: {rule: stratified-kfold, folds: 5, repeats: 2, seed: 3}\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy]\n',
);
const timed = (args) => {
  const r = spawnSync('/usr/bin/time', ['-f', '%e %M', process.execPath, bin, ...args], { cwd: out, encoding: 'utf8' });
  const [seconds, kb] = r.stderr.trim().split('\n').pop().split(' ').map(Number);
  return { seconds, mb: kb / 1024 };
};
const median = (xs) => [...xs].sort((a, b) => a - b)[1];
const first = timed(['lock', '.']);
const size = (statSync(join(out, 'foldseal.lock.json')).size / 1e6).toFixed(1);
const runs = { lock: [], check: [] };
for (let i = 0; i < 3; i++) for (const c of ['lock', 'check']) runs[c].push(timed([c, '.']));
console.log(`100,000 rows, 2 repeats: lock file ${size} MB`);
console.log(`  first lock: ${first.seconds.toFixed(2)} s, peak RSS ${first.mb.toFixed(0)} MiB`);
for (const c of ['lock', 'check'])
  console.log(
    `  ${c} (lock in place, median of 3): ${median(runs[c].map((r) => r.seconds)).toFixed(2)} s, peak RSS ` +
      `${median(runs[c].map((r) => r.mb)).toFixed(0)} MiB`,
  );
