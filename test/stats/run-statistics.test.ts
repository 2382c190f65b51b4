// Intervals and the permutation test end to end through the built binary, on scikit-learn's bundled
// breast-cancer (two classes) and iris (three classes) tables (test/reference/data/).
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { cli, root, sha256, tempDir } from '../helpers.js';

const table = (name: string) => readFileSync(join(root, `test/reference/data/${name}`), 'utf8');

async function run(csv: string, label: string, statistics: string, extra = '') {
  const protocol = [
    'foldseal: 1',
    'name: stats',
    `data: {file: data.csv, sha256: "${sha256(csv)}", id: id, label: ${label}}`,
    'split: {rule: stratified-kfold, folds: 5, repeats: 2, seed: 3}',
    'model: {kind: gaussian-nb}',
    'metrics: [accuracy, roc-auc, log-loss]',
    `statistics: ${statistics}`,
    extra,
  ].join('\n');
  const dir = tempDir({ 'data.csv': csv, 'p.yaml': protocol });
  const r = await cli(['run', 'p.yaml', '--out', 'out'], dir);
  const results = r.code === 0 ? JSON.parse(readFileSync(join(dir, 'out', 'results.json'), 'utf8')) : undefined;
  return { r, results };
}

t.test('strong signal: every interval holds its estimate, the corrected t is wider than the naive, p = 1/(N+1)', async (t) => {
  const { r, results } = await run(
    table('breast-cancer.csv'),
    'diagnosis',
    '{level: 0.9, bootstrap: {replicates: 200, seed: 5}, permutation: {count: 99, seed: 5, metric: roc-auc}}',
  );
  t.equal(r.code, 0, r.stderr);
  const s = results.statistics;
  t.equal(s.version, 'resample-v1');
  for (const m of ['accuracy', 'roc-auc', 'log-loss']) {
    const i = s.intervals[m];
    t.equal(i.pooled.value, results.summary[m].pooled, `${m}: the bootstrap's estimate is the reported pooled value`);
    t.ok(i.pooled.percentile[0] <= i.pooled.value && i.pooled.value <= i.pooled.percentile[1], `${m}: percentile interval holds it`);
    t.ok(i.pooled.bca[0] < i.pooled.bca[1], `${m}: BCa interval`);
    t.ok(i.folds.corrected[1] - i.folds.corrected[0] > i.folds.naive[1] - i.folds.naive[0], `${m}: corrected wider than naive`);
    t.equal(i.folds.df, 9);
  }
  t.ok(s.intervals['roc-auc'].pooled.delong[0] < s.intervals['roc-auc'].pooled.value, "DeLong's interval for two classes");
  t.equal(s.permutation['p-value'], 1 / 100, 'Ojala & Garriga: strong signal gives the smallest p-value');
  t.ok(Math.abs(s.permutation.null.median - 0.5) < 0.1, `null median ${s.permutation.null.median} near chance`);
  t.match(r.stdout, /90 % intervals \(resample-v1; 200 stratified bootstrap replicates, seed 5\)/);
  t.match(r.stdout, /so it is too narrow/);
  t.match(r.stdout, /p = 0\.0100 \(= 1\/\(N\+1\), the smallest possible with 99 permutations\)/);
});

t.test('labels unrelated to the features: the permutation p-value is not small', async (t) => {
  // The diagnosis column reassigned by a fixed stride: the same class counts, no relation to the features.
  const lines = table('breast-cancer.csv').trim().split('\n');
  const labels = lines.slice(1).map((l) => l.slice(l.lastIndexOf(',') + 1));
  const n = labels.length;
  const shuffled = lines.slice(1).map((l, i) => `${l.slice(0, l.lastIndexOf(','))},${labels[(i * 211) % n]}`);
  const { r, results } = await run(
    [lines[0], ...shuffled].join('\n') + '\n',
    'diagnosis',
    '{permutation: {count: 99, seed: 9, metric: accuracy}}',
  );
  t.equal(r.code, 0, r.stderr);
  t.ok(results.statistics.permutation['p-value'] > 0.05, `p = ${results.statistics.permutation['p-value']}`);
  t.equal(results.statistics.bootstrap, null);
});

t.test('three classes: no DeLong interval, said so; permutations within groups need data.group', async (t) => {
  const { r, results } = await run(table('iris.csv'), 'species', '{bootstrap: {replicates: 100, seed: 1}}');
  t.equal(r.code, 0, r.stderr);
  t.equal(results.statistics.intervals['roc-auc'].pooled.delong, null);
  t.match(results.statistics.notes.join('\n'), /defined for two classes/);
  const bad = await run(table('iris.csv'), 'species', '{permutation: {count: 10, seed: 1, metric: brier, within: group}}');
  t.equal(bad.r.code, 1);
  t.match(bad.r.stderr, /permutation test's metric brier is not among the protocol's metrics/);
  t.match(bad.r.stderr, /within: group needs data.group/);
});
