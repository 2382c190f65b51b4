/**
 * Reference: scikit-learn 1.2.1 (Debian python3-sklearn) — the mean of the per-fold models'
 * predict_proba on rows never seen in the cross-validation, and the vote counts of those models
 * (test/reference/sklearn_reference.py, case breast-cancer-new-rows-gaussian-nb, Wisconsin data).
 */
import t from 'tap';
import { fixture, referenceCases, runCase } from '../reference/compare.js';

const name = 'breast-cancer-new-rows-gaussian-nb';
const ref = fixture(name) as ReturnType<typeof fixture> & { 'new-rows': { ids: string[]; mean: number[][]; votes: number[][] } };

t.test('applied.csv probabilities equal the mean of the reference fold models', async (t) => {
  const { out } = await runCase(referenceCases().find((c) => c.name === name)!);
  const lines = out.files['applied.csv']!.trimEnd().split('\n');
  t.equal(lines[0], 'id,source,predicted,agreement,p_benign,p_malignant');
  const byId = new Map(
    lines.slice(1).map((l) => {
      const c = l.split(',');
      return [c[0], c];
    }),
  );
  t.equal(byId.size, 105);
  t.equal([...byId.values()].filter((c) => c[1] === 'held-out').length, 5, 'the 5 rows that were in the cross-validation are held-out');
  let worst = 0;
  ref['new-rows'].ids.forEach((id, i) => {
    const cells = byId.get(id)!;
    t.equal(cells[1], 'folds');
    worst = Math.max(
      worst,
      Math.abs(Number(cells[4]) - ref['new-rows'].mean[i][0]),
      Math.abs(Number(cells[5]) - ref['new-rows'].mean[i][1]),
    );
    const votes = ref['new-rows'].votes[i];
    const predicted = ['benign', 'malignant'].indexOf(cells[2]);
    t.equal(Number(cells[3]), votes[predicted] / 8, `${id}: agreement is the reference vote share of the prediction`);
  });
  t.ok(worst <= 1e-9, `largest probability difference ${worst.toExponential(2)}`);
});

t.test('the vote counts equal those of the reference fold models', async (t) => {
  const { out } = await runCase(referenceCases().find((c) => c.name === name)!);
  t.equal(JSON.parse(Buffer.from(out.files['models.json']!).toString('utf8')).folds.length, 8, '4 folds × 2 repeats saved');
  for (const r of out.applied!.filter((row) => row.source === 'folds')) {
    const counts = [0, 0];
    for (const top of r.tops) counts[top]++;
    t.same(counts, ref['new-rows'].votes[ref['new-rows'].ids.indexOf(r.id)], r.id);
  }
});
