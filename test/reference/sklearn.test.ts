/**
 * Reference: scikit-learn 1.2.1 (Debian python3-sklearn), SciPy and NumPy, run by
 * test/reference/sklearn_reference.py on the same folds. Committed fixtures always; a live
 * re-computation when Debian's python3 with scikit-learn is present.
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import t, { type Test } from 'tap';
import { debianPython, tempDir } from '../helpers.js';
import { metrics } from '../../src/metric/registry.js';
import { scored } from '../../src/metric/types.js';
import type { MetricName } from '../../src/protocol/types.js';
import { fixture, refDir, referenceCases, runCase, type ReferenceFixture } from './compare.js';

const TOLERANCE = 1e-9;
const close = (a: number, b: number) => Math.abs(a - b) <= TOLERANCE * Math.max(1, Math.abs(b));

async function compareCase(t: Test, name: string, ref: ReferenceFixture) {
  const c = referenceCases().find((x) => x.name === name)!;
  const { out, ids, table } = await runCase(c);
  const cv = out.cv;
  const row = new Map(ids.map((id, i) => [id, i]));
  const k = cv.classes.length;
  t.same(cv.classes, ref.classes, 'classes in the same order');
  t.equal(cv.folds.length, ref.folds.length, 'same number of folds');
  let worst = 0;
  for (const rf of ref.folds) {
    const ours = cv.folds.find((f) => f.repeat === rf.repeat && f.fold === rf.fold)!;
    const model = cv.models.find((m) => m.repeat === rf.repeat && m.fold === rf.fold)!;
    t.same(model.pipeline.columns, rf.features, `repeat ${rf.repeat} fold ${rf.fold}: same selected features`);
    rf.ids.forEach((id, i) => {
      for (let c2 = 0; c2 < k; c2++) worst = Math.max(worst, Math.abs(cv.oof[rf.repeat - 1][row.get(id)! * k + c2] - rf.proba[i][c2]));
    });
    // foldseal's metric functions on the reference's probabilities give the reference's values (1e-9).
    const onRef = scored(
      Int32Array.from(rf.ids, (id) => table.y[row.get(id)!]),
      Float64Array.from(rf.proba.flat()),
      k,
      cv.positive,
    );
    for (const [m, v] of Object.entries(rf.metrics)) {
      const mine = metrics[m as MetricName].value(onRef);
      t.ok(
        mine !== null && close(mine, v),
        `repeat ${rf.repeat} fold ${rf.fold} ${m} on the reference probabilities: foldseal ${mine} vs reference ${v}`,
      );
      // End to end (our probabilities) too. Ranking metrics get a looser bound: naive Bayes
      // probabilities saturate at 1, where 1e-16 differences reorder otherwise tied rows.
      const endToEnd = ours.metrics[m];
      const bound = m === 'roc-auc' || m === 'average-precision' ? 0.01 : TOLERANCE;
      t.ok(
        endToEnd !== null && Math.abs(endToEnd - v) <= bound * Math.max(1, Math.abs(v)),
        `repeat ${rf.repeat} fold ${rf.fold} ${m} end to end: foldseal ${endToEnd} vs reference ${v}`,
      );
    }
  }
  t.ok(worst <= TOLERANCE, `largest probability difference ${worst.toExponential(2)} ≤ ${TOLERANCE}`);
  // Pooled metrics: foldseal's metric functions on the reference's own out-of-fold probabilities
  // must give the reference's pooled values. (Comparing pooled ranking metrics of the two sets of
  // probabilities directly is not meaningful: naive Bayes probabilities saturate near 1, and
  // 1e-16 differences reorder tied rows across folds.)
  ref.pooled.forEach((pooledRef, r) => {
    const n = ids.length;
    const truth = new Int32Array(n);
    const proba = new Float64Array(n * k);
    let m = 0;
    const byId = new Map<string, number[]>();
    for (const rf of ref.folds.filter((f) => f.repeat === r + 1))
      rf.ids.forEach((id, i) => {
        byId.set(id, rf.proba[i]);
      });
    for (const id of [...byId.keys()].sort()) {
      truth[m] = table.y[row.get(id)!];
      proba.set(byId.get(id)!, m * k);
      m++;
    }
    const s = scored(truth.subarray(0, m), proba.subarray(0, m * k), k, cv.positive);
    for (const [name, v] of Object.entries(pooledRef)) {
      const mine = metrics[name as MetricName].value(s);
      t.ok(
        mine !== null && close(mine, v),
        `repeat ${r + 1} pooled ${name} on the reference probabilities: foldseal ${mine} vs reference ${v}`,
      );
    }
  });
}

for (const c of referenceCases()) {
  t.test(`${c.name} agrees with the committed scikit-learn fixture`, async (t) => compareCase(t, c.name, fixture(c.name)));
}

const live = debianPython('sklearn', 'scipy', 'pandas');
t.test(
  'live: scikit-learn recomputed now agrees with foldseal',
  { skip: live ? false : 'Debian python3 with scikit-learn not installed (apt-get install python3-sklearn python3-pandas)' },
  async (t) => {
    const out = tempDir();
    const r = spawnSync(
      '/usr/bin/python3',
      [join(refDir, 'sklearn_reference.py'), join(refDir, 'cases.json'), join(refDir, 'fixtures'), out],
      { encoding: 'utf8' },
    );
    t.equal(r.status, 0, r.stderr);
    for (const c of referenceCases()) await t.test(c.name, async (t) => compareCase(t, c.name, fixture(c.name, out)));
  },
);
