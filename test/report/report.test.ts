/**
 * The report: its curves against scikit-learn (roc_curve, precision_recall_curve, calibration_curve)
 * on out-of-fold predictions of breast-cancer as bundled with scikit-learn; the methods paragraph
 * says what the run did; `report` and `run --report` write one self-contained page.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { aucOf } from '../../src/metric/ranking.js';
import { curves, reliability, scoresFor } from '../../src/report/curves.js';
import { parsePredictions } from '../../src/report/predictions.js';
import { featureStability } from '../../src/report/stability.js';
import { cli, referenceTable, root, sha256, tempDir } from '../helpers.js';

const bc = referenceTable('breast-cancer.csv');
const protocol = (extra = '') =>
  [
    'foldseal: 1',
    'name: bc-report',
    'data:',
    '  file: data.csv',
    `  sha256: "${sha256(bc.csv)}"`,
    '  id: id',
    '  label: diagnosis',
    '  positive: malignant',
    'split: {rule: stratified-kfold, folds: 5, repeats: 2, seed: 41}',
    'preprocess: [standardize, {select: {top: 8, by: f-test}}]',
    'model: {kind: logistic, options: {l2: 1}}',
    'metrics: [roc-auc, accuracy, brier]',
    extra,
  ].join('\n');

const dir = tempDir({ 'data.csv': bc.csv, 'p.yaml': protocol() });
const ran = await cli(['run', 'p.yaml', '--out', 'res'], dir);
const predictionsPath = join(dir, 'res', 'predictions.csv');

t.test('the run for the report succeeded', async (t) => {
  t.equal(ran.code, 0, ran.stderr);
});

const reference = spawnSync('/usr/bin/python3', [join(root, 'test/reference/report_reference.py'), predictionsPath, 'malignant'], {
  encoding: 'utf8',
});
const live = reference.status === 0 ? reference.stdout : undefined;

t.test('ROC, precision–recall and reliability points equal scikit-learn’s on the same predictions', async (t) => {
  if (!live) t.comment(`scikit-learn not available (Debian python3-sklearn), only the AUC identity is checked: ${reference.stderr}`);
  const o = parsePredictions(readFileSync(predictionsPath), 'predictions.csv');
  const c = o.classes.indexOf('malignant');
  const s = scoresFor(o, c, (r) => o.repeat[r] === 1);
  const { roc, pr } = curves(s.score, s.positive);
  // The trapezoid under our ROC points is the Mann–Whitney AUC the metrics report (ties move together).
  let area = 0;
  for (let i = 1; i < roc.length; i++) area += ((roc[i].x - roc[i - 1].x) * (roc[i].y + roc[i - 1].y)) / 2;
  t.ok(Math.abs(area - aucOf(s.score, s.positive)!) < 1e-12, `area ${area}`);
  if (!live) return;
  const ref = JSON.parse(live);
  // roc_curve adds a (0, 0) start like ours; its points are the distinct thresholds from the top.
  t.equal(roc.length, ref.fpr.length, 'one ROC point per distinct score, plus the origin');
  roc.forEach((p, i) => {
    t.ok(Math.abs(p.x - ref.fpr[i]) < 1e-12 && Math.abs(p.y - ref.tpr[i]) < 1e-12, `ROC point ${i}`);
  });
  // precision_recall_curve lists thresholds from the bottom, ending at (recall 0, precision 1): ours reversed.
  const theirs = ref.recall.map((x: number, i: number) => ({ x, y: ref.precision[i] })).reverse();
  t.same(pr.length, theirs.length);
  pr.forEach((p, i) => {
    t.ok(Math.abs(p.x - theirs[i].x) < 1e-12 && Math.abs(p.y - theirs[i].y) < 1e-12, `PR point ${i}`);
  });
  const bins = reliability(s.score, s.positive);
  t.same(bins.length, ref['cal-true'].length);
  bins.forEach((b, i) => {
    t.ok(Math.abs(b.observed - ref['cal-true'][i]) < 1e-12, `bin ${i} observed`);
    t.ok(Math.abs(b.predicted - ref['cal-pred'][i]) < 1e-12, `bin ${i} predicted`);
  });
});

t.test('feature stability counts the fold models that read each feature', async (t) => {
  const models = JSON.parse(readFileSync(join(dir, 'res', 'models.json'), 'utf8'));
  const { total, features } = featureStability(models);
  t.equal(total, 10);
  for (const f of features) t.equal(f.folds, models.folds.filter((m: any) => m.pipeline.columns.includes(f.feature)).length, f.feature);
  t.ok(
    features.every((f, i) => i === 0 || features[i - 1].folds >= f.folds),
    'most used first',
  );
});

t.test('report --methods states the design, seed, split version, pipeline, hashes', async (t) => {
  const r = await cli(['report', 'res', '--methods'], dir);
  t.equal(r.code, 0, r.stderr);
  const m = r.stdout;
  const results = JSON.parse(readFileSync(join(dir, 'res', 'results.json'), 'utf8'));
  t.match(m, '5-fold stratified cross-validation, repeated 2 times');
  t.match(m, 'split-v1 rule of foldseal from SHA-256 keys of their ids with seed 41');
  t.match(m, 'the 8 features with the highest ANOVA F statistic in the training part were kept');
  t.match(m, 'an L2-penalized logistic regression (λ = 1)');
  t.match(m, `ROC AUC ${results.summary['roc-auc'].mean.toFixed(3)} (SD ${results.summary['roc-auc'].sd.toFixed(3)}`);
  t.match(m, sha256(bc.csv));
  t.match(m, sha256(readFileSync(join(dir, 'res', 'manifest.json'))));
  t.notMatch(m, /bootstrap|permutation/, 'no statistics section: none claimed');
});

t.test('report writes one page with no external reference; refuses to overwrite; --protocol adds the audit', async (t) => {
  const r = await cli(['report', 'res'], dir);
  t.equal(r.code, 0, r.stderr);
  const html = readFileSync(join(dir, 'res', 'report.html'), 'utf8');
  t.notMatch(html, /<script|<link|@import|url\(|src=|href="http/i, 'no script, stylesheet, import or remote reference');
  t.equal((html.match(/<svg/g) ?? []).length, 3, 'ROC, PR and reliability plots inline');
  t.match(html, 'Not included: pass --protocol');
  t.match(html, 'local regulations');
  t.equal((await cli(['report', 'res'], dir)).code, 2, 'an existing report is not replaced without --force');
  const audited = await cli(['report', 'res', '--protocol', 'p.yaml', '--force'], dir);
  t.equal(audited.code, 0, audited.stderr);
  t.match(readFileSync(join(dir, 'res', 'report.html'), 'utf8'), 'No finding: no copies across folds');
  const other = tempDir({ 'data.csv': bc.csv, 'q.yaml': protocol('verify: {tolerance: 0.1}') });
  const wrong = await cli(['report', join(dir, 'res'), '--protocol', 'q.yaml', '--out', 'x.html'], other);
  t.equal(wrong.code, 2);
  t.match(wrong.stderr, 'is not the protocol these results were run from');
  // The results folder with its report is still one foldseal may replace with --force.
  t.equal((await cli(['run', 'p.yaml', '--out', 'res', '--force', '--report'], dir)).code, 0);
  // A report.html foldseal did not write is the user's: --force refuses the folder and deletes nothing.
  writeFileSync(join(dir, 'res', 'report.html'), '<html>my own notes</html>');
  const mine = await cli(['run', 'p.yaml', '--out', 'res', '--force'], dir);
  t.equal(mine.code, 2, mine.stderr);
  t.match(mine.stderr, 'report.html');
  t.equal(readFileSync(join(dir, 'res', 'report.html'), 'utf8'), '<html>my own notes</html>', 'the user file is kept');
});

t.test('a result file changed after the run is refused', async (t) => {
  const d = tempDir({ 'data.csv': bc.csv, 'p.yaml': protocol() });
  t.equal((await cli(['run', 'p.yaml', '--out', 'res'], d)).code, 0);
  const path = join(d, 'res', 'predictions.csv');
  writeFileSync(path, readFileSync(path, 'utf8').replace(',1,', ',2,'));
  const r = await cli(['report', 'res'], d);
  t.equal(r.code, 1);
  t.match(r.stderr, 'does not match the SHA-256 recorded in results.json');
});

t.test('three classes, intervals and a permutation test: curves one class against the rest, every number in the methods', async (t) => {
  const iris = referenceTable('iris.csv');
  const p = [
    'foldseal: 1',
    'name: iris-report',
    'data:',
    '  file: iris.csv',
    `  sha256: "${sha256(iris.csv)}"`,
    '  id: id',
    '  label: species',
    'split: {rule: stratified-kfold, folds: 3, seed: 9}',
    'model: {kind: knn, options: {k: 5}}',
    'reconcile: {rule: majority-vote, tie: class-order}',
    'metrics: [accuracy, roc-auc]',
    'statistics:',
    '  bootstrap: {replicates: 200, seed: 4}',
    '  permutation: {count: 19, seed: 5, metric: accuracy}',
  ].join('\n');
  const d = tempDir({ 'iris.csv': iris.csv, 'p.yaml': p });
  const run = await cli(['run', 'p.yaml', '--out', 'res', '--report'], d);
  t.equal(run.code, 0, run.stderr);
  const methods = (await cli(['report', 'res', '--methods'], d)).stdout;
  const results = JSON.parse(readFileSync(join(d, 'res', 'results.json'), 'utf8'));
  t.match(methods, 'a k-nearest-neighbour classifier (k = 5, Euclidean distance)');
  t.match(methods, 'combined by majority vote (ties: class-order)');
  t.match(methods, 'stratified bootstrap with 200 replicates, seed 4');
  t.match(methods, `A permutation test (19 permutations of the labels, seed 5`);
  t.match(methods, `p = ${results.statistics.permutation['p-value'].toPrecision(3)} for accuracy`);
  t.match(methods, 'No hyperparameters were tuned.');
  const html = readFileSync(join(d, 'res', 'report.html'), 'utf8');
  t.match(html, 'setosa vs rest');
  t.match(html, 'pooled 95 % BCa');
  t.match(html, '<strong>p = ');
  // A permutation test alone (no bootstrap): the methods say the intervals come from the folds only.
  // (The report once failed here with an internal error, found by running it through the launcher.)
  writeFileSync(join(d, 'q.yaml'), p.replace('  bootstrap: {replicates: 200, seed: 4}\n', ''));
  const alone = await cli(['run', 'q.yaml', '--out', 'res-q', '--report'], d);
  t.equal(alone.code, 0, alone.stderr);
  const without = (await cli(['report', 'res-q', '--methods'], d)).stdout;
  t.match(without, 'Intervals are at the 95 % level (over the folds only, without a bootstrap; resample-v1 resampling rule).');
  t.match(without, 'A permutation test (19 permutations of the labels, seed 5');
  t.notMatch(without, 'BCa');
});
