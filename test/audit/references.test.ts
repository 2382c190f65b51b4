/**
 * The audit's measurements against outside references: pandas' duplicated() on iris, scikit-learn's
 * roc_auc_score and numpy's corrcoef on breast-cancer (both tables as bundled with scikit-learn),
 * scipy's chi2_contingency and Cramér's V. Values in test/reference/fixtures/audit.json, written by
 * test/reference/audit_reference.py; recomputed live when Debian's python3 has those libraries.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { association } from '../../src/audit/confounding.js';
import { exactDuplicateSets, nearDuplicatePairs } from '../../src/audit/duplicates.js';
import { mayReachSeparation, pairwiseSeparation } from '../../src/audit/separation.js';
import { tableFromBytes } from '../../src/table/load.js';
import { debianPython, root } from '../helpers.js';

const fixture = JSON.parse(readFileSync(join(root, 'test/reference/fixtures/audit.json'), 'utf8'));
const read = (name: string, label: string) =>
  tableFromBytes(readFileSync(join(root, 'test/reference/data', name)), name, { id: 'id', label, missing: [] }, undefined, () => undefined)
    .table!;
const iris = read('iris.csv', 'species');
const bc = read('breast-cancer.csv', 'diagnosis');

t.test('exact duplicates of iris are the rows pandas duplicated(keep=False) marks', async (t) => {
  const sets = exactDuplicateSets(iris.X, iris.featureNames);
  t.same(
    sets.flatMap((s) => Array.from(s, (r) => iris.ids[r])),
    fixture['iris-duplicates'],
  );
  t.same(exactDuplicateSets(bc.X, bc.featureNames), [], 'breast-cancer has none (pandas agrees: 0 duplicated rows)');
  // Tables of 2^21 rows and more sort their hashes by comparison: the same sets.
  t.same(exactDuplicateSets(iris.X, iris.featureNames, 0), sets, 'the comparison sort finds the same sets');
});

t.test('per-feature separation equals scikit-learn roc_auc_score (max of AUC and 1 − AUC) on breast-cancer', async (t) => {
  const column = new Float64Array(bc.X.rows);
  bc.featureNames.forEach((name, c) => {
    for (let r = 0; r < bc.X.rows; r++) column[r] = bc.X.data[r * bc.X.cols + c];
    t.ok(Math.abs(pairwiseSeparation(column, bc.y, 2)! - fixture['breast-cancer-auc'][name]) < 1e-12, name);
  });
  t.ok(
    Math.max(...(Object.values(fixture['breast-cancer-auc']) as number[])) < 0.99,
    'no breast-cancer feature reaches the 0.99 threshold',
  );
});

t.test('the sort-free screen never rules out a breast-cancer feature at or below its scikit-learn separation', async (t) => {
  const column = new Float64Array(bc.X.rows);
  let ruledOut = 0;
  bc.featureNames.forEach((name, c) => {
    for (let r = 0; r < bc.X.rows; r++) column[r] = bc.X.data[r * bc.X.cols + c];
    const sep: number = fixture['breast-cancer-auc'][name];
    // At the feature's own value the screen must say "maybe"; a little above, it may rule it out.
    t.ok(mayReachSeparation(column, bc.y, 2, sep), `${name} at ${sep}`);
    if (!mayReachSeparation(column, bc.y, 2, sep + 0.02)) ruledOut++;
  });
  t.ok(ruledOut > 20, `${ruledOut} of 30 features ruled out 0.02 above their separation without a sort`);
});

t.test('near-duplicate pairs at r ≥ 0.95 are numpy corrcoef’s pairs of standardized breast-cancer rows', async (t) => {
  const ours = nearDuplicatePairs(bc.X, 0.95).map(({ i, j, r }) => [i, j, r]);
  const theirs = fixture['breast-cancer-near-pairs-0.95'] as [number, number, number][];
  t.equal(ours.length, theirs.length, `${theirs.length} pairs`);
  ours.forEach(([i, j, r], k) => {
    t.same([i, j], theirs[k].slice(0, 2));
    t.ok(Math.abs(r - theirs[k][2]) < 1e-12, `r ${r} vs ${theirs[k][2]}`);
  });
  t.same(nearDuplicatePairs(bc.X, 0.98), [], 'none at the audit threshold 0.98: the clean table gives no finding');
});

t.test('chi-square and Cramér’s V equal scipy on iris species × binned sepal length', async (t) => {
  const ref = fixture['iris-sepal-bins-chi2'];
  const bins: number[] = ref.bins;
  const col = iris.featureNames.indexOf('sepal_length');
  const coded = Int32Array.from({ length: iris.X.rows }, (_, r) => bins.filter((b) => b <= iris.X.data[r * iris.X.cols + col]).length);
  const a = association(coded, bins.length + 1, iris.y, 3)!;
  t.ok(Math.abs(a.chiSquare - ref.chi2) < 1e-9, `chi2 ${a.chiSquare} vs ${ref.chi2}`);
  t.equal(a.df, ref.df);
  t.ok(Math.abs(a.cramerV - ref['cramer-v']) < 1e-12, `V ${a.cramerV}`);
  t.ok(Math.abs(a.p - ref.p) / ref.p < 1e-6, `p ${a.p} vs ${ref.p}`);
  t.equal(association(new Int32Array(iris.X.rows), 1, iris.y, 3), null, 'one level: no test');
});

const live = debianPython('sklearn', 'scipy', 'pandas');
t.test(
  'the fixture is what the reference libraries compute today',
  { skip: live ? false : 'Debian python3 with sklearn, scipy, pandas not installed' },
  async (t) => {
    const r = spawnSync('/usr/bin/python3', [join(root, 'test/reference/audit_reference.py')], { encoding: 'utf8' });
    t.equal(r.status, 0, r.stderr);
    const now = JSON.parse(r.stdout);
    t.same(now['iris-duplicates'], fixture['iris-duplicates']);
    t.same(now['breast-cancer-near-pairs-0.95'].length, fixture['breast-cancer-near-pairs-0.95'].length);
    for (const [k, v] of Object.entries(now['breast-cancer-auc']))
      t.ok(Math.abs((v as number) - fixture['breast-cancer-auc'][k]) < 1e-12, k);
    t.ok(Math.abs(now['iris-sepal-bins-chi2'].chi2 - fixture['iris-sepal-bins-chi2'].chi2) < 1e-9);
  },
);
