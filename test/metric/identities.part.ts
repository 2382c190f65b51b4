import fc from 'fast-check';
import t from 'tap';
import { metrics } from '../../src/metric/registry.js';
import { aucOf } from '../../src/metric/ranking.js';
import { scored } from '../../src/metric/types.js';

const probaFrom = (pos: number[]) => Float64Array.from(pos.flatMap((p) => [1 - p, p]));

// Reference: ROC AUC equals the Mann–Whitney U statistic divided by n1·n0 (Bamber 1975;
// Hanley & McNeil 1982, Radiology 143:29), with ties counted as 1/2 — checked here against a
// direct count over all positive/negative pairs.
t.test('ROC AUC equals U / (n1·n0) counted over all pairs', async (t) => {
  fc.assert(
    fc.property(fc.array(fc.tuple(fc.integer({ min: 0, max: 20 }), fc.boolean()), { minLength: 2, maxLength: 60 }), (rows) => {
      const score = Float64Array.from(rows.map(([s]) => s / 20));
      const positive = Uint8Array.from(rows.map(([, p]) => (p ? 1 : 0)));
      let u = 0;
      let n1 = 0;
      let n0 = 0;
      rows.forEach(([a, pa]) => {
        if (!pa) {
          n0++;
          return;
        }
        n1++;
        rows.forEach(([b, pb]) => {
          if (!pb) u += a > b ? 1 : a === b ? 0.5 : 0;
        });
      });
      const auc = aucOf(score, positive);
      return n1 === 0 || n0 === 0 ? auc === null : Math.abs(auc! - u / (n1 * n0)) < 1e-12;
    }),
    { numRuns: 500 },
  );
  t.pass('identity held');
});

// Worked by hand from Matthews' (1975) formula MCC = (TP·TN − FP·FN) / √((TP+FP)(TP+FN)(TN+FP)(TN+FN)):
// TP 5, FN 1, FP 2, TN 4 → 18 / √1260 = 0.507092552837110.
t.test('MCC of a worked 2×2 example', async (t) => {
  const truth = Int32Array.from([1, 1, 1, 1, 1, 1, 0, 0, 0, 0, 0, 0]);
  const pred = [1, 1, 1, 1, 1, 0, 1, 1, 0, 0, 0, 0];
  const s = scored(truth, probaFrom(pred.map((p) => (p ? 0.9 : 0.1))), 2, 1);
  t.ok(Math.abs(metrics.mcc.value(s)! - 18 / Math.sqrt(1260)) < 1e-15);
  t.ok(Math.abs(metrics.mcc.value(s)! - 0.50709255283711) < 1e-12);
});

// Cohen's kappa, the textbook example (from memory; it is the one on the Wikipedia page for
// Cohen's kappa): 50 items, both "yes" 20, first yes/second no 5, first no/second yes 10, both
// "no" 15 → p_o = 0.7, p_e = 0.5, κ = 0.4.
t.test("Cohen's kappa of the 50-item textbook example", async (t) => {
  const truth: number[] = [];
  const pred: number[] = [];
  const add = (a: number, b: number, n: number) => {
    for (let i = 0; i < n; i++) {
      truth.push(a);
      pred.push(b);
    }
  };
  add(1, 1, 20);
  add(1, 0, 5);
  add(0, 1, 10);
  add(0, 0, 15);
  const s = scored(Int32Array.from(truth), probaFrom(pred.map((p) => (p ? 0.8 : 0.2))), 2, 1);
  t.ok(Math.abs(metrics.kappa.value(s)! - 0.4) < 1e-12);
});

t.test('the multiclass MCC reduces to the 2×2 formula for two classes', async (t) => {
  fc.assert(
    fc.property(fc.array(fc.tuple(fc.boolean(), fc.boolean()), { minLength: 1, maxLength: 50 }), (rows) => {
      const truth = Int32Array.from(rows.map(([a]) => (a ? 1 : 0)));
      const s = scored(truth, probaFrom(rows.map(([, b]) => (b ? 0.7 : 0.3))), 2, 1);
      let tp = 0,
        tn = 0,
        fp = 0,
        fn = 0;
      rows.forEach(([a, b]) => {
        if (a && b) tp++;
        else if (!a && !b) tn++;
        else if (b) fp++;
        else fn++;
      });
      const d = Math.sqrt((tp + fp) * (tp + fn) * (tn + fp) * (tn + fn));
      const expected = d === 0 ? 0 : (tp * tn - fp * fn) / d;
      return Math.abs(metrics.mcc.value(s)! - expected) < 1e-12;
    }),
    { numRuns: 300 },
  );
  t.pass('identity held');
});

t.test('undefined values are null, never NaN', async (t) => {
  const oneClass = scored(Int32Array.from([1, 1, 1]), probaFrom([0.2, 0.6, 0.9]), 2, 1);
  t.equal(metrics['roc-auc'].value(oneClass), null);
  t.equal(metrics['average-precision'].value(scored(Int32Array.from([0, 0]), probaFrom([0.2, 0.6]), 2, 1)), null);
  t.equal(metrics.kappa.value(scored(Int32Array.from([1, 1]), probaFrom([0.9, 0.9]), 2, 1)), null);
  t.equal(metrics.mcc.value(oneClass), 0);
  t.ok(
    Number.isFinite(metrics['log-loss'].value(scored(Int32Array.from([1]), probaFrom([0]), 2, 1))!),
    'a zero probability gives a finite log-loss',
  );
});

t.test('three-class macro scores and the multiclass Brier score', async (t) => {
  // truth 0,1,2,2; predictions 0,2,2,1 (hand-worked): per-class precision 1, 0, 1/2 → macro 1/2;
  // recall 1, 0, 1/2 → macro 1/2; accuracy 1/2.
  const proba = Float64Array.from([0.8, 0.1, 0.1, 0.1, 0.2, 0.7, 0.2, 0.2, 0.6, 0.1, 0.6, 0.3]);
  const s = scored(Int32Array.from([0, 1, 2, 2]), proba, 3, 2);
  t.equal(metrics.accuracy.value(s), 0.5);
  t.equal(metrics.precision.value(s), 0.5);
  t.equal(metrics.recall.value(s), 0.5);
  t.ok(Math.abs(metrics.f1.value(s)! - 0.5) < 1e-15);
  // Brier (1950): mean over rows of Σ_k (p_k − o_k)²: (0.06 + 1.14 + 0.24 + 0.86) / 4 = 0.575.
  t.ok(Math.abs(metrics.brier.value(s)! - 0.575) < 1e-12);
});
