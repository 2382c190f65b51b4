/**
 * Nested tuning end to end. Reference: scikit-learn 1.2.1's grid search (Debian python3-sklearn)
 * inside each outer fold, on the outer and inner folds foldseal exports, run by
 * test/reference/nested_reference.py; its output is committed (fixtures/nested-breast-cancer.json)
 * and recomputed live when /usr/bin/python3 has scikit-learn. Data: scikit-learn's bundled
 * breast-cancer table (test/reference/data/).
 */
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { cli, debianPython, referenceTable, root, sha256, tempDir } from '../helpers.js';

interface RefFold {
  repeat: number;
  fold: number;
  scores: number[];
  chosen: Record<string, number>;
  ids: string[];
  classes: string[];
  proba: number[][];
}

const data = referenceTable('breast-cancer.csv').csv;
const protocol = (prefer: string, extra = '') =>
  [
    'foldseal: 1',
    'name: nested-reference',
    `data: {file: data.csv, sha256: "${sha256(data)}", id: id, label: diagnosis, positive: malignant}`,
    'split: {rule: stratified-kfold, folds: 5, seed: 2006}',
    'preprocess: [standardize, {select: {top: [3, 5, 10, 20], by: f-test}}]',
    'model: {kind: knn, options: {k: [5, 9, 15]}}',
    'tune:',
    '  split: {rule: stratified-kfold, folds: 5}',
    '  metric: accuracy',
    `  prefer: ${prefer}`,
    'metrics: [accuracy, roc-auc]',
    extra,
  ].join('\n') + '\n';
const PREFER = '[{select.top: smallest}, {model.k: largest}]';
const dir = tempDir({ 'data.csv': data, 'p.yaml': protocol(PREFER) });
// Signed, with a tuned refit model, on this thread: the rerun below uses two worker threads (and no
// progress hooks, which once left the workers' completion uncounted) and must match byte for byte.
const run = cli(['keygen', '--out', 'author'], dir).then(() =>
  cli(['run', 'p.yaml', '--out', 'res', '--key', 'author.key', '--refit'], dir, { FOLDSEAL_THREADS: '1' }),
);

function reference(): { folds: RefFold[] } {
  const committed = JSON.parse(readFileSync(join(root, 'test', 'reference', 'fixtures', 'nested-breast-cancer.json'), 'utf8'));
  return committed;
}

t.test('the chosen candidates, inner scores and outer probabilities equal scikit-learn grid search on the same folds', async (t) => {
  const r = await run;
  t.equal(r.code, 0, r.stderr);
  const results = JSON.parse(readFileSync(join(dir, 'res', 'results.json'), 'utf8'));
  const ref = reference();
  const predictions = readFileSync(join(dir, 'res', 'predictions.csv'), 'utf8')
    .trimEnd()
    .split('\n')
    .slice(1);
  const byId = new Map(predictions.map((l) => [l.split(',')[0], l.split(',')]));
  t.equal(ref.folds.length, 5);
  let ties = 0;
  let worst = 0;
  for (const rf of ref.folds) {
    const ours = results.tuning.folds.find((f: RefFold) => f.repeat === rf.repeat && f.fold === rf.fold);
    t.same(ours.chosen, rf.chosen, `outer fold ${rf.fold}: the same candidate`);
    const scoreGap = Math.max(...ours['inner-scores'].map((s: number, i: number) => Math.abs(s - rf.scores[i])));
    t.ok(scoreGap <= 1e-12, `fold ${rf.fold}: every candidate's mean inner score (largest difference ${scoreGap})`);
    const best = Math.max(...rf.scores);
    if (rf.scores.filter((s) => s === best).length > 1) ties++;
    t.same(rf.classes, ['benign', 'malignant']);
    rf.ids.forEach((id, i) => {
      const line = byId.get(id)!;
      t.equal(Number(line[2]), rf.fold);
      worst = Math.max(worst, Math.abs(Number(line[5]) - rf.proba[i][0]), Math.abs(Number(line[6]) - rf.proba[i][1]));
    });
  }
  t.ok(ties >= 1, 'at least one outer fold is decided by the tie rule');
  t.ok(worst <= 1e-9, `largest probability difference ${worst} ≤ 1e-9`);
  t.equal(results.tuning.estimate, 'nested');
  t.same(results.tuning['chosen-counts']['model.k'], [
    { value: 5, folds: 1 },
    { value: 9, folds: 3 },
    { value: 15, folds: 1 },
  ]);
  t.match(r.stdout, 'the scores above are the nested estimate');
  t.match(r.stdout, /select\.top: 3 ×0, 5 ×0, 10 ×0, 20 ×5/);
  const models = JSON.parse(readFileSync(join(dir, 'res', 'models.json'), 'utf8'));
  t.same(
    models.folds.map((f: { chosen: Record<string, number> }) => f.chosen),
    ref.folds.map((f) => f.chosen),
  );
  t.same(models.preprocess[1].top, [3, 5, 10, 20], 'models.json shows the candidates the protocol lists');
});

const python = debianPython('sklearn', 'pandas');
t.test(
  'the committed reference is what scikit-learn computes now',
  { skip: python ? false : 'Debian python3-sklearn not installed' },
  async (t) => {
    await run;
    const folds = await cli(['folds', 'p.yaml', '--out', 'outer.csv'], dir);
    const inner = await cli(['folds', 'p.yaml', '--inner', '--out', 'inner.csv'], dir);
    t.equal(folds.code, 0, folds.stderr);
    t.equal(inner.code, 0, inner.stderr);
    t.match(readFileSync(join(dir, 'inner.csv'), 'utf8'), /^outer-repeat,outer-fold,id,repeat,fold\n1,1,bc-0002,1,\d\n/);
    const c = {
      data: join(dir, 'data.csv'),
      label: 'diagnosis',
      positive: 'malignant',
      top: [3, 5, 10, 20],
      k: [5, 9, 15],
      metric: 'accuracy',
      prefer: [
        ['select.top', 'smallest'],
        ['model.k', 'largest'],
      ],
    };
    writeFileSync(join(dir, 'case.json'), JSON.stringify(c));
    const r = spawnSync(
      '/usr/bin/python3',
      [join(root, 'test', 'reference', 'nested_reference.py'), 'case.json', 'outer.csv', 'inner.csv'],
      {
        cwd: dir,
        encoding: 'utf8',
      },
    );
    t.equal(r.status, 0, r.stderr);
    const live = JSON.parse(r.stdout) as { folds: RefFold[] };
    const committed = reference();
    t.same(
      live.folds.map((f) => f.chosen),
      committed.folds.map((f) => f.chosen),
    );
    let worst = 0;
    live.folds.forEach((f, i) => {
      const before = committed.folds[i];
      worst = Math.max(worst, ...f.scores.map((s, j) => Math.abs(s - before.scores[j])));
      worst = Math.max(worst, ...f.proba.flat().map((p, j) => Math.abs(p - before.proba.flat()[j])));
    });
    t.ok(worst <= 1e-12, `live vs committed ${worst}`);
  },
);

t.test('verify --rerun of a tuned run is identical; threads and the serial loop give the same bytes', async (t) => {
  const signed = await run;
  t.match(signed.stdout, /the refit model uses select\.top = 20, model\.k = \d+ \(chosen by the same search on every row\)/);
  const v = await cli(['verify', 'res/manifest.json', '--key', 'author.pub', '--rerun'], dir, { FOLDSEAL_THREADS: '2' });
  t.equal(v.code, 0, v.stdout + v.stderr);
  t.equal(v.stdout.trimEnd().split('\n').pop(), 'identical');
  const refit = JSON.parse(readFileSync(join(dir, 'res', 'models.json'), 'utf8')).refit;
  t.equal(refit.chosen['select.top'], 20);
  t.same(Object.keys(refit.chosen), ['select.top', 'model.k']);
});

t.test('a tuned run split into shards merges into the same searches and predictions', async (t) => {
  await run;
  for (const shard of ['1/2', '2/2']) {
    const r = await cli(['run', 'p.yaml', '--shard', shard, '--out', `part-${shard[0]}.json`], dir);
    t.equal(r.code, 0, r.stderr);
  }
  const merged = await cli(['merge', 'p.yaml', 'part-1.json', 'part-2.json', '--out', 'merged'], dir);
  t.equal(merged.code, 0, merged.stderr);
  t.equal(readFileSync(join(dir, 'merged', 'predictions.csv'), 'utf8'), readFileSync(join(dir, 'res', 'predictions.csv'), 'utf8'));
  const tuning = (d: string) => JSON.parse(readFileSync(join(dir, d, 'results.json'), 'utf8')).tuning.folds;
  t.same(tuning('merged'), tuning('res'));
});
