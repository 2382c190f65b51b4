/**
 * A hand-made example (worked by hand): four Gaussian NB fold models on one feature x, class
 * means t − 1 and t + 1, unit variances, equal priors, so P(class 1 | x) = σ(2(x − t)), with
 * boundaries t = 0, 2, 3, 4.
 *   x = 3.5: models t = 0, 2, 3 vote 1, t = 4 votes 0  → 3 against 1 → class 1, agreement 0.75
 *   x = 2.5: t = 0, 2 vote 1, t = 3, 4 vote 0         → 2 against 2 (a tie);
 *            mean P(1) = (σ(5) + σ(1) + σ(−1) + σ(−3)) / 4 ≈ 0.5102 → mean-probability picks 1,
 *            class-order picks 0, abstain leaves it empty.
 *   x = −1: every model votes 0                        → agreement 1
 */
import t from 'tap';
import { appliedCsv, applyRows, disagreementReport } from '../../src/reconcile/applied.js';
import type { SavedModel } from '../../src/reconcile/models-file.js';
import { reconcile } from '../../src/reconcile/reconcile.js';
import type { TieRule } from '../../src/protocol/types.js';

const fold = (t0: number, i: number): SavedModel => ({
  repeat: 1,
  fold: i + 1,
  pipeline: { steps: [], columns: ['x'] },
  model: { logPrior: [Math.log(0.5), Math.log(0.5)], mean: [[t0 - 1], [t0 + 1]], variance: [[1], [1]] },
});
const folds = [0, 2, 3, 4].map(fold);
const X = { rows: 3, cols: 1, data: Float64Array.from([3.5, 2.5, -1]) };
const sigma = (z: number) => 1 / (1 + Math.exp(-z));

t.test('3 against 1 gives the majority class and agreement 0.75', async (t) => {
  const r = reconcile('gaussian-nb', folds, null, X, 2, 'majority-vote', 'abstain');
  t.equal(r.predicted[0], 1);
  t.equal(r.agreement[0], 0.75);
  t.same(Array.from(r.values.subarray(0, 2)), [0.25, 0.75], 'vote shares');
  t.same(
    r.top.map((x) => x[0]),
    [1, 1, 1, 0],
  );
  t.equal(r.agreement[2], 1);
});

const expected: Record<TieRule, number> = { 'mean-probability': 1, 'class-order': 0, abstain: -1 };
for (const tie of Object.keys(expected) as TieRule[]) {
  t.test(`a 2-against-2 tie under tie: ${tie}`, async (t) => {
    const r = reconcile('gaussian-nb', folds, null, X, 2, 'majority-vote', tie);
    t.equal(r.predicted[1], expected[tie]);
    t.equal(r.tied[1], 1);
    t.equal(r.agreement[1], 0.5);
  });
}

t.test('mean-probability averages the models (the hand-worked 0.5102)', async (t) => {
  const r = reconcile('gaussian-nb', folds, null, X, 2, 'mean-probability', null);
  const mean = (sigma(5) + sigma(1) + sigma(-1) + sigma(-3)) / 4;
  t.ok(Math.abs(r.values[3] - mean) < 1e-15);
  t.equal(r.predicted[1], 1);
});

t.test('rows, sources and the report', async (t) => {
  const refit = fold(2.8, 9);
  const rows = { ids: ['n-b', 'n-a', 'known'], X, ignoredColumns: [], lines: new Int32Array([2, 3, 4]) };
  const heldOut = new Map([['known', { mean: Float64Array.from([0.9, 0.1]), tops: [0, 0, 1] }]]);
  const voted = applyRows({
    kind: 'gaussian-nb',
    folds,
    refit,
    classes: ['no', 'yes'],
    rule: 'majority-vote',
    tie: 'abstain',
    rows,
    heldOut,
  });
  t.same(
    voted.map((r) => [r.id, r.source, r.predicted]),
    [
      ['known', 'held-out', 0],
      ['n-a', 'folds', -1],
      ['n-b', 'folds', 1],
    ],
    'sorted by id bytes; held-out ids keep their held-out value',
  );
  t.equal(voted[0].agreement, 2 / 3, 'held-out agreement is the share of repeats agreeing');
  const csv = appliedCsv(voted, ['no', 'yes'], 'note');
  t.equal(csv.split('\n')[0], '# note');
  t.equal(csv.split('\n')[3], 'n-a,folds,,0.5,0.5,0.5', 'an abstained row has an empty prediction');
  const report = disagreementReport(voted, ['no', 'yes']);
  t.match(report, '3 of 3 rows have fold models that disagree (agreement < 1); 1 tied votes');
  t.match(report, 'n-a  folds  agreement 0.50  predicted (abstained)  models: yes yes no no');
  const refitted = applyRows({ kind: 'gaussian-nb', folds, refit, classes: ['no', 'yes'], rule: 'refit', tie: null, rows, heldOut });
  t.same(
    refitted.map((r) => r.source),
    ['held-out', 'refit', 'refit'],
  );
  t.ok(Math.abs(refitted[2].values[1] - sigma(2 * (3.5 - 2.8))) < 1e-12, 'the refit model predicts');
});
