/**
 * Numerically hard fits: wide data, degenerate folds, and the messages that name where a fit
 * failed. The reference for the wide logistic fit is scikit-learn (see the breast-cancer-wide
 * case in test/reference); here the fit is checked against its own optimality condition.
 */
import t from 'tap';
import { models, withDefaults } from '../../src/model/registry.js';
import { cli, sha256, tempDir } from '../helpers.js';

function seeded(seed: number) {
  let s = seed;
  return () => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return s / 2147483648;
  };
}

t.test('logistic on 128 × 12,625 (leukemia-sized) converges with the defaults and is stationary', async (t) => {
  const rnd = seeded(7);
  const n = 128;
  const p = 12625;
  const data = new Float64Array(n * p);
  const y = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    y[i] = i % 3 === 0 ? 1 : 0;
    for (let j = 0; j < p; j++) data[i * p + j] = rnd() - 0.5 + (j < 20 ? y[i] * 0.4 : 0);
  }
  const m = models.logistic.fit({ rows: n, cols: p, data }, y, withDefaults('logistic', {}), { classCount: 2 }) as {
    weights: number[][];
    iterations: number;
  };
  t.ok(m.iterations < 50, `${m.iterations} Newton steps`);
  // Stationarity of Σ log-loss + ½‖w‖² (l2 = 1): w = −Xᵀ(q − y) and Σ(q − y) = 0 (the intercept).
  const w = m.weights[0];
  const r = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let z = w[p];
    for (let j = 0; j < p; j++) z += w[j] * data[i * p + j];
    r[i] = 1 / (1 + Math.exp(-z)) - y[i];
  }
  let worst = Math.abs(r.reduce((a, b) => a + b, 0));
  for (let j = 0; j < p; j += 97) {
    let g = w[j];
    for (let i = 0; i < n; i++) g += r[i] * data[i * p + j];
    worst = Math.max(worst, Math.abs(g));
  }
  t.ok(worst < 1e-8, `largest gradient component ${worst}`);
});

t.test('a fit that fails names its repeat and fold', async (t) => {
  const csv = 'id,label,a\n' + Array.from({ length: 12 }, (_, i) => `r${i},${i < 6 ? 'x' : 'y'},${i < 6 ? i : i + 100}`).join('\n') + '\n';
  const dir = tempDir({
    'data.csv': csv,
    'p.yaml':
      `foldseal: 1\nname: s\ndata: {file: data.csv, sha256: "${sha256(csv)}", id: id, label: label}\nsplit: {rule: ` +
      `stratified-kfold, folds: 2, repeats: 2, seed: 3}\nmodel: {kind: logistic, options: {l2: 0, max-iterations: 5}}\n`,
  });
  const r = await cli(['run', 'p.yaml', '--out', 'res'], dir);
  t.equal(r.code, 1);
  t.match(r.stderr, /error: logistic did not converge in 5 Newton steps .* \(repeat 1, fold 1\)/);
  t.match(r.stderr, 'hint: the classes may be separable; set model.options.l2 above 0');
});

t.test('summaries say over how many folds a metric was defined, and recommend pooled values on tiny test parts', async (t) => {
  const csv = 'id,label,a\n' + Array.from({ length: 8 }, (_, i) => `r${i},${i % 2 ? 'x' : 'y'},${i + (i % 2) * 3}`).join('\n') + '\n';
  const dir = tempDir({
    'data.csv': csv,
    'p.yaml':
      `foldseal: 1\nname: loo\ndata: {file: data.csv, sha256: "${sha256(csv)}", id: id, label: label}\nsplit: {rule: ` +
      `leave-one-out}\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy, roc-auc, mcc]\n`,
  });
  const r = await cli(['run', 'p.yaml', '--out', 'res'], dir);
  t.equal(r.code, 0, r.stderr);
  t.match(r.stdout, /roc-auc\s+— \(0 of 8 folds\)/);
  t.match(
    r.stdout,
    'test parts hold as few as 1 row: per-fold roc-auc, mcc are unstable or undefined there, so report their pooled values',
  );
  t.match(r.stderr, 'warning: roc-auc is undefined in 8 of 8 folds');
});

t.test('a long problem list reaches a pipe whole, and is capped per kind unless --all-problems', async (t) => {
  const bad =
    'id,label,a\n' +
    Array.from({ length: 4000 }, (_, i) => `r${i},${i % 2 ? 'x' : 'y'},${i === 0 ? 1 : 'oops' + '!'.repeat(40)}`).join('\n') +
    '\n';
  const dir = tempDir({
    'data.csv': bad,
    'p.yaml':
      `foldseal: 1\nname: many\ndata: {file: data.csv, sha256: "${sha256(bad)}", id: id, label: label, features: ` +
      `[a]}\nsplit: {rule: kfold, folds: 2, seed: 1}\nmodel: {kind: gaussian-nb}\n`,
  });
  const capped = await cli(['validate', 'p.yaml'], dir);
  t.equal(capped.code, 1);
  // 50 problems of the kind are printed: the count of unlisted cells, then 49 located ones.
  t.equal(capped.stderr.split('\n').filter((l) => l.includes('is not a number')).length, 49);
  t.match(capped.stderr, 'data.csv: error: 2999 more non-numeric cells not listed');
  t.match(capped.stderr, '… and 951 more data-not-a-number problems not shown (--all-problems shows them)');
  const all = await cli(['validate', '--all-problems', 'p.yaml'], dir);
  const lines = all.stderr.split('\n').filter((l) => l.includes('is not a number')).length;
  t.ok(all.stderr.length > 128 * 1024, `${all.stderr.length} bytes of problems on stderr`);
  t.equal(lines, 1000, 'every listed problem arrives; the reader lists 1,000 and counts the rest');
  t.match(all.stderr, 'p.yaml: invalid', 'the last line arrives too');
});
