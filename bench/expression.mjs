#!/usr/bin/env node
// Reading an expression set as it is shipped: a seeded 12,625 probe sets × 128 samples matrix,
// features in rows, gzipped, with a sample sheet (id, label, group, a QC column) joined by id,
// a row filter and a label map. Times whole `foldseal validate` processes (read, decompress,
// transpose, join, filter, check, assign folds), median of 5. Target: under 1 s. Invented data.
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { seededRandom } from '../scripts/seeded-random.mjs';

const here = new URL('.', import.meta.url).pathname;
const out = join(here, 'out', 'expression');
mkdirSync(out, { recursive: true });
// The launcher users run (package.json's bin).
const bin = join(here, '..', 'bin', 'foldseal.cjs');
const probes = 12_625;
const samples = 128;
const rand = seededRandom(128);
const ids = Array.from({ length: samples }, (_, s) => `x${String(s + 1).padStart(3, '0')}`);
const grade = ids.map((_, s) => ['A1', 'A2', 'B1', 'B2'][s % 4]);
const lines = [['probe', ...ids].join('\t')];
for (let p = 0; p < probes; p++) {
  const cells = ids.map((_, s) => (6 + 2 * rand() + (p < 50 && grade[s].startsWith('A') ? 1 : 0)).toFixed(3));
  lines.push([`p${p + 1}`, ...cells].join('\t'));
}
const matrix = gzipSync(lines.join('\n') + '\n');
writeFileSync(join(out, 'matrix.tsv.gz'), matrix);
const sheet =
  ['sample,grade,batch,qc', ...ids.map((id, s) => `${id},${grade[s]},b${s % 8},${s % 16 === 5 ? 'fail' : 'pass'}`)].join('\n') + '\n';
writeFileSync(join(out, 'samples.csv'), sheet);
const sha = (bytes) => createHash('sha256').update(bytes).digest('hex');
writeFileSync(
  join(out, 'e.yaml'),
  `foldseal: 1\nname: read-expression\ndata:\n  file: matrix.tsv.gz\n  sha256: "${sha(matrix)}"\n  layout: features-in-rows\n` +
    `  samples: {file: samples.csv, sha256: "${sha(sheet)}"}\n  id: sample\n  label: grade\n  group: batch\n` +
    '  where: {qc: [pass]}\n  classes: {A: [A1, A2], B: [B1, B2]}\n  positive: A\n' +
    'split: {rule: grouped-kfold, folds: 4, seed: 1}\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy]\n',
);
const times = [];
for (let i = 0; i < 5; i++) {
  const start = process.hrtime.bigint();
  const r = spawnSync(process.execPath, [bin, 'validate', join(out, 'e.yaml')], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(r.stderr);
  times.push(Number(process.hrtime.bigint() - start) / 1e9);
}
times.sort((a, b) => a - b);
console.log(
  `${probes.toLocaleString('en')} × ${samples} features-in-rows, gzipped (${(matrix.length / 1e6).toFixed(1)} MB), with a sample ` +
    `sheet, a row filter and a label map: foldseal validate ${times[2].toFixed(2)} s (median of 5; ${times[0].toFixed(2)}–${times[4].toFixed(2)} s)`,
);
