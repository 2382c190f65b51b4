// Branches of the paired comparison that the breast-cancer pair does not reach: three classes
// (scikit-learn's bundled iris table), metrics on one side only, folds where a metric is undefined,
// too few folds, and the direction of a lower-is-better metric.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { compareSides, pairingProblems } from '../../src/compare/paired.js';
import type { ComparedSide } from '../../src/compare/side.js';
import { mcnemarExact } from '../../src/stats/mcnemar.js';
import { cli, root, sha256, tempDir } from '../helpers.js';

t.test('three classes: McNemar per repeat, no DeLong, and a note saying why', async (t) => {
  const iris = readFileSync(join(root, 'test/reference/data/iris.csv'), 'utf8');
  const head =
    `foldseal: 1\ndata: {file: iris.csv, sha256: "${sha256(iris)}", id: id, label: species}\n` +
    'split: {rule: stratified-kfold, folds: 5, seed: 4}\nmetrics: [accuracy, log-loss]\n';
  const dir = tempDir({
    'iris.csv': iris,
    'a.yaml': `${head}name: iris-nb\nmodel: {kind: gaussian-nb}\n`,
    'b.yaml': `${head}name: iris-knn\nmodel: {kind: knn, options: {k: 5}}\n`,
  });
  const r = await cli(['compare', 'a.yaml', 'b.yaml', '--format', 'json'], dir);
  t.equal(r.code, 0, r.stderr);
  const c = JSON.parse(r.stdout).comparison;
  t.equal(c.delong, null);
  t.match(c.notes.join('\n'), "DeLong's test compares two-class ROC AUCs");
  t.equal(c.mcnemar.length, 1);
  t.equal(c.mcnemar[0].rows, 150);
  const text = await cli(['compare', 'a.yaml', 'b.yaml'], dir);
  t.notMatch(text.stdout, /DeLong's paired test/);
});

function side(name: string, values: Record<string, (number | null)[]>, extra: Partial<ComparedSide> = {}): ComparedSide {
  const metrics = Object.keys(values);
  const n = values[metrics[0]].length;
  return {
    source: name,
    name,
    protocolSha256: sha256(name),
    dataSha256: 'd',
    assignmentSha256: 'f',
    repeats: 1,
    classes: ['n', 'p'],
    positive: 'p',
    metrics,
    folds: Array.from({ length: n }, (_, i) => ({
      repeat: 1,
      fold: i + 1,
      trainRows: 40,
      testRows: 10,
      metrics: Object.fromEntries(metrics.map((m) => [m, values[m][i]])),
    })),
    predictions: {
      ids: ['1', '2', '3', '4'],
      repeat: Int32Array.of(1, 1, 1, 1),
      truth: Int32Array.of(0, 0, 1, 1),
      predicted: Int32Array.of(0, 1, 1, 1),
      positive: Float64Array.of(0.1, 0.6, 0.7, 0.9),
    },
    ...extra,
  };
}

t.test('metrics on one side, undefined folds, a lower-is-better winner', async (t) => {
  const a = side('A', { 'log-loss': [0.5, 0.6, 0.55, 0.7, 0.65], mcc: [0.1, null, 0.2, 0.3, 0.2], accuracy: [0.8, 0.8, 0.8, 0.8, 0.8] });
  const b = side('B', { 'log-loss': [0.3, 0.35, 0.3, 0.4, 0.33], mcc: [0.2, 0.3, null, 0.4, 0.3], brier: [0.1, 0.1, 0.1, 0.1, 0.1] });
  t.same(pairingProblems(a, b), []);
  const c = compareSides(a, b, { level: 0.9 });
  t.same(
    c.metrics.map((m) => [m.metric, m.folds, m['undefined-folds']]),
    [
      ['log-loss', 5, 0],
      ['mcc', 3, 2],
    ],
  );
  t.match(c.notes[0], 'left out accuracy, brier');
  t.match(c.verdict.text, /^log-loss: B \(B\) scored better than A \(A\) on these data and folds, by 0\.2640 .*90 % interval/);
  const reversed = compareSides(b, a, { level: 0.9 });
  t.match(reversed.verdict.text, /^log-loss: A \(B\) scored better than B \(A\)/);
  const sparse = compareSides(side('A', { mcc: [0.1, null, null] }), side('B', { mcc: [0.2, 0.1, null] }), { level: 0.95 });
  t.same(sparse.metrics, []);
  t.match(sparse.notes.join('\n'), 'mcc: fewer than two folds with a value on both sides; no test');
  t.equal(sparse.verdict.text, 'no metric could be compared');
  // McNemar on the four rows: A and B predict alike, so no discordant rows and p = 1.
  t.same([c.mcnemar[0]['only-a-right'], c.mcnemar[0]['only-b-right'], c.mcnemar[0].p], [0, 0, 1]);
});

t.test('pairing problems name what differs', async (t) => {
  const a = side('A', { accuracy: [0.8, 0.9] });
  t.same(
    pairingProblems(a, side('B', { accuracy: [0.8, 0.9] }, { dataSha256: 'e', classes: ['n', 'q'] })).map((p) => p.code),
    ['compare-different-data', 'compare-different-classes'],
  );
  t.same(
    pairingProblems(a, side('B', { accuracy: [0.8, 0.9] }, { assignmentSha256: 'g', positive: 'n' })).map((p) => p.code),
    ['compare-different-folds', 'compare-different-classes'],
  );
});

t.test("McNemar's exact p-value, worked by hand (statsmodels is checked live in compare.test.ts)", async (t) => {
  // 2·P(X ≤ 1), X ~ Binomial(10, 1/2) = 2·(1 + 10)/1024; symmetric; capped at 1 when b = c.
  t.ok(Math.abs(mcnemarExact(1, 9) - 22 / 1024) < 1e-16);
  t.equal(mcnemarExact(9, 1), mcnemarExact(1, 9));
  t.equal(mcnemarExact(5, 5), 1);
  t.equal(mcnemarExact(0, 0), 1);
});

t.test('the two demo protocols compare as a pair', async (t) => {
  const r = await cli(['compare', 'protocols/demo.yaml', 'protocols/demo-logistic.yaml', '--metric', 'roc-auc']);
  t.equal(r.code, 0, r.stderr);
  t.match(r.stdout, /^A: protocols\/demo\.yaml \(seedling-blight-nb\)\nB: protocols\/demo-logistic\.yaml \(seedling-blight-logistic\)/);
  t.match(r.stdout, /\nroc-auc: (no evidence of a difference|[AB] \()/);
});
