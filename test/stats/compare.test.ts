// `foldseal compare` held to outside references, on two protocols over scikit-learn's bundled
// breast-cancer table (test/reference/compare-protocols.mjs), run by the built binary:
// - corrected resampled t-test per metric (t, p, interval): the t distribution of scipy.stats 1.10
//   (Debian's python3-scipy), compare_reference.py, run here;
// - McNemar's exact test per repeat: statsmodels' mcnemar(exact=True) (Debian's python3-statsmodels),
//   the same script;
// - DeLong's paired test per repeat: R's pROC 1.18 roc.test(paired = TRUE) (Debian's r-cran-proc),
//   fixtures/compare-proc.json from make-compare-fixture.mjs, which records the predictions it saw.
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { comparePair } from '../reference/compare-protocols.mjs';
import { cli, root, sha256, tempDir } from '../helpers.js';

const close = (a: number, b: number, tol: number) => Math.abs(a - b) <= tol * Math.max(1, Math.abs(b));
const pair = comparePair();
const dir = tempDir({ 'a.yaml': pair.a, 'b.yaml': pair.b });
for (const side of ['a', 'b']) {
  const r = await cli(['run', `${side}.yaml`, '--out', side, '--allow-outside'], dir);
  if (r.code !== 0) throw new Error(r.stderr);
}
const compared = await cli(['compare', 'a', 'b', '--format', 'json'], dir);
const c = JSON.parse(compared.stdout).comparison;

t.test('corrected t-test and McNemar match scipy and statsmodels', async (t) => {
  t.equal(compared.code, 0, compared.stderr);
  const python = '/usr/bin/python3';
  const r = spawnSync(python, [join(root, 'test/reference/compare_reference.py'), join(dir, 'a'), join(dir, 'b'), '0.95'], {
    encoding: 'utf8',
  });
  // CI installs Debian's python3-scipy and python3-statsmodels; a machine without them cannot run this check.
  t.equal(r.status, 0, r.stderr);
  const ref = JSON.parse(r.stdout);
  t.same(
    c.metrics.map((m: { metric: string }) => m.metric),
    Object.keys(ref.metrics),
  );
  for (const m of c.metrics) {
    const want = ref.metrics[m.metric];
    t.ok(close(m.difference, want.mean, 1e-12), `${m.metric}: mean difference ${m.difference} = ${want.mean}`);
    t.ok(close(m.t, want.t, 1e-10), `${m.metric}: t ${m.t} = ${want.t}`);
    t.ok(close(m.p, want.p, 1e-9), `${m.metric}: p ${m.p} = ${want.p}`);
    t.ok(close(m.interval[0], want.lower, 1e-9) && close(m.interval[1], want.upper, 1e-9), `${m.metric}: interval`);
  }
  t.equal(c.mcnemar.length, ref.mcnemar.length, 'a McNemar test per repeat');
  for (const [i, want] of ref.mcnemar.entries()) {
    const got = c.mcnemar[i];
    t.same(
      [got['both-right'], got['only-a-right'], got['only-b-right'], got['both-wrong']],
      want.table.flat(),
      `repeat ${want.repeat}: table`,
    );
    t.ok(close(got.p, want.p, 1e-12), `repeat ${want.repeat}: McNemar p ${got.p} = ${want.p}`);
  }
  // The pair differs: these data make the tests say so (a check that cannot pass on all-zero output).
  t.ok(c.metrics[0].p < 0.05 && c.mcnemar.every((m: { p: number }) => m.p < 0.05));
});

t.test("DeLong's paired test matches pROC", async (t) => {
  const fixture = JSON.parse(readFileSync(join(root, 'test/reference/fixtures/compare-proc.json'), 'utf8'));
  for (const side of ['a', 'b'] as const)
    t.equal(
      sha256(readFileSync(join(dir, side, 'predictions.csv'))),
      fixture['predictions-sha256'][side],
      `${side}: the predictions pROC saw`,
    );
  t.equal(c.delong.length, fixture.repeats.length);
  for (const [i, want] of fixture.repeats.entries()) {
    const got = c.delong[i];
    t.ok(close(got['auc-a'], want.auc_a, 1e-12) && close(got['auc-b'], want.auc_b, 1e-12), `repeat ${want.repeat}: AUCs`);
    t.ok(close(got.z, want.z, 1e-9), `repeat ${want.repeat}: z ${got.z} = ${want.z}`);
    t.ok(close(got.p, want.p, 1e-9), `repeat ${want.repeat}: p ${got.p} = ${want.p}`);
  }
});

t.test('the text report: tables, notes and a verdict that does not over-claim', async (t) => {
  const r = await cli(['compare', 'a', 'b'], dir);
  t.equal(r.code, 0, r.stderr);
  t.match(r.stdout, /^A: a \(bc-gaussian-nb\)\nB: b \(bc-logistic\)\npaired: the same data/);
  t.match(r.stdout, /McNemar's exact test/);
  t.match(r.stdout, /DeLong's paired test/);
  t.match(r.stdout, /\naccuracy: A \(bc-gaussian-nb\) scored better than B \(bc-logistic\) on these data and folds, by 0\.0340/);
  const brier = await cli(['compare', 'a', 'b', '--metric', 'brier'], dir);
  t.match(
    brier.stdout,
    /\nbrier: no evidence of a difference between A and B at the 5 % level .*this does not show that they perform the same\n$/,
  );
  // A protocol is run in memory and compares exactly as its results folder does.
  const fromProtocol = await cli(['compare', 'a.yaml', 'b/manifest.json', '--format', 'json', '--allow-outside'], dir);
  t.equal(fromProtocol.code, 0, fromProtocol.stderr);
  const p = JSON.parse(fromProtocol.stdout).comparison;
  t.same({ ...p, a: undefined, b: undefined }, { ...c, a: undefined, b: undefined });
});

t.test('refuses what is not paired, and bad options', async (t) => {
  const other = pair.b.replace('seed: 31', 'seed: 32').replace('name: bc-logistic', 'name: bc-logistic-other-folds');
  writeFileSync(join(dir, 'c.yaml'), other);
  const folds = await cli(['compare', 'a', 'c.yaml', '--allow-outside'], dir);
  t.equal(folds.code, 1);
  t.match(folds.stderr, /error: A and B tested the rows in different folds/);
  t.match(folds.stderr, /hint: a paired comparison needs both protocols to name the same data file and the same split/);
  const csv = 'id,diagnosis,x\n' + Array.from({ length: 20 }, (_, i) => `r${i},${i % 2 ? 'benign' : 'malignant'},${i}`).join('\n') + '\n';
  const d = tempDir({
    'd.csv': csv,
    'd.yaml':
      `foldseal: 1\nname: other-data\ndata: {file: d.csv, sha256: "${sha256(csv)}", id: id, label: diagnosis, positive: malignant}\n` +
      'split: {rule: stratified-kfold, folds: 5, repeats: 3, seed: 31}\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy]\n',
  });
  const data = await cli(['compare', join(dir, 'a'), 'd.yaml', '--format', 'json'], d);
  t.equal(data.code, 1);
  t.same(
    JSON.parse(data.stdout).problems.map((q: { code: string }) => q.code),
    ['compare-different-data'],
  );
  const same = await cli(['compare', 'a', 'a'], dir);
  t.equal(same.code, 0);
  t.match(same.stderr, /warning: A and B are the same protocol/);
  t.match(same.stdout, /every one of 15 folds; with no spread across folds the t-test says nothing/);
  t.match((await cli(['compare', 'a', 'b', '--metric', 'mcc'], dir)).stderr, /--metric mcc is not reported by both A and B/);
  const level = await cli(['compare', 'a', 'b', '--level', '95'], dir);
  t.equal(level.code, 2);
  t.match(level.stderr, /--level must be a number between 0 and 1/);
  writeFileSync(join(dir, 'b', 'predictions.csv'), readFileSync(join(dir, 'b', 'predictions.csv'), 'utf8').replace('malignant', 'benign'));
  const tampered = await cli(['compare', 'a', 'b'], dir);
  t.equal(tampered.code, 1);
  t.match(tampered.stderr, /predictions.csv does not match the SHA-256 recorded in results.json/);
  const missing = await cli(['compare', 'a', 'nowhere.yaml'], dir);
  t.equal(missing.code, 2);
});
