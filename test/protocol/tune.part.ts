/**
 * Tuning grids and their checks. The candidate order, the tie rule and the located problems
 * are foldseal's own contract (docs/protocol.md `tune`, docs/split-spec.md §9); the scores
 * behind a choice are checked against scikit-learn in test/run/nested.test.ts.
 */
import t from 'tap';
import { FitError } from '../../src/problems/problem.js';
import { asWritten, candidates, liftGrid, partsFor, valuesOf } from '../../src/protocol/grid.js';
import type { PreprocessStep, TunedSetting } from '../../src/protocol/types.js';
import { choose, innerFits } from '../../src/run/nested.js';
import { expectValidation, sha256, smallCsv } from '../helpers.js';

const steps = [{ step: 'standardize' }, { step: 'select', top: [5, 20, 50], by: 'f-test' }] as unknown as PreprocessStep[];
const lifted = liftGrid(steps, { k: [3, 9], l2: 1 });

t.test('lists become the grid, in protocol order; the protocol keeps each first value', async (t) => {
  t.same(
    lifted.grid.map((g) => [g.name, g.values]),
    [
      ['select.top', [5, 20, 50]],
      ['model.k', [3, 9]],
    ],
  );
  t.equal((lifted.preprocess[1] as { top: number }).top, 5);
  t.same(lifted.options, { k: 3, l2: 1 });
  t.same((steps[1] as unknown as { top: number[] }).top, [5, 20, 50], 'the input is not changed');
  const p = { preprocess: lifted.preprocess, model: { kind: 'knn' as const, options: lifted.options }, grid: lifted.grid };
  // The first setting varies slowest.
  t.same(
    candidates(lifted.grid).map((c) => Object.values(valuesOf(lifted.grid, c))),
    [
      [5, 3],
      [5, 9],
      [20, 3],
      [20, 9],
      [50, 3],
      [50, 9],
    ],
  );
  const parts = partsFor(p, Int32Array.of(2, 1));
  t.same(parts.model.options, { k: 9, l2: 1 });
  t.equal((parts.preprocess[1] as { top: number }).top, 50);
  t.equal((p.preprocess[1] as { top: number }).top, 5, 'partsFor copies');
  t.same((asWritten(p).preprocess[1] as unknown as { top: number[] }).top, [5, 20, 50]);
  t.same(asWritten(p).options, { k: [3, 9], l2: 1 });
  t.same(candidates([]), [new Int32Array(0)], 'no grid: one candidate, the protocol itself');
  t.equal(innerFits({ rule: 'stratified-kfold', folds: 4, repeats: 3, assign: 'balanced' }), 12);
  t.equal(innerFits({ rule: 'holdout', folds: 5, repeats: 2, assign: 'balanced', testFraction: 0.2 }), 2);
});

t.test('the best mean inner score wins; ties go by the prefer order, setting by setting', async (t) => {
  const grid: TunedSetting[] = [
    { name: 'select.top', target: { step: 1, setting: 'top' }, values: [50, 5, 20] },
    { name: 'model.solver', target: { option: 'solver' }, values: ['newton-cg', 'newton'] },
  ];
  const all = candidates(grid); // (50, cg) (50, n) (5, cg) (5, n) (20, cg) (20, n)
  const tied = [0.9, 0.9, 0.9, 0.9, 0.8, null];
  const smallestFirst = [
    { name: 'select.top', order: 'smallest' as const },
    { name: 'model.solver', order: 'first-listed' as const },
  ];
  t.equal(choose(tied, 'higher', grid, smallestFirst, all, 'accuracy'), 2, 'top 5, the first-listed solver');
  t.equal(
    choose(
      tied,
      'higher',
      grid,
      [
        { name: 'model.solver', order: 'first-listed' },
        { name: 'select.top', order: 'largest' },
      ],
      all,
      'x',
    ),
    0,
  );
  t.equal(
    choose(
      tied,
      'higher',
      grid,
      [
        { name: 'select.top', order: 'first-listed' },
        { name: 'model.solver', order: 'first-listed' },
      ],
      all,
      'x',
    ),
    0,
  );
  t.equal(choose(tied, 'lower', grid, smallestFirst, all, 'log-loss'), 4, 'lower is better for a loss');
  t.equal(choose([0.5, 0.7, null, 0.7000000000000001, 0.1, 0.2], 'higher', grid, smallestFirst, all, 'x'), 3, 'equality is exact');
  t.throws(() => choose([null, null, null, null, null, null], 'higher', grid, smallestFirst, all, 'roc-auc'), FitError);
});

const csv = smallCsv();
const base = `foldseal: 1\nname: t\ndata:\n  file: data.csv\n  sha256: "${sha256(csv)}"\n  id: id\n  label: label\n`;
const split = 'split: {rule: stratified-kfold, folds: 2, seed: 7}\n';
const tune = (inner: string, prefer = '[{model.k: smallest}]') => `tune: {split: ${inner}, metric: accuracy, prefer: ${prefer}}\n`;

function validates(name: string, body: string, expected: string[], code = 1) {
  expectValidation(t, name, { 'data.csv': csv, 'p.yaml': base + body }, expected, code);
}

validates('a list without a tune section is located at the list', `${split}model: {kind: knn, options: {k: [1, 3]}}\n`, [
  'p.yaml:9:33: error: model.k lists 2 candidate values, but the protocol has no tune section to choose among them',
  '  hint: add a tune section (inner split, metric, prefer), or give one value',
]);
validates('a tune section without a list', `${split}model: {kind: knn}\n${tune('{rule: kfold, folds: 2}')}`, [
  'p.yaml:10:1: error: the tune section has nothing to tune: no model option or step setting lists candidate values',
]);
validates(
  'prefer must name every tuned setting once',
  `${split}model: {kind: knn, options: {k: [1, 3]}}\npreprocess: [{select: {top: [1, 2], by: f-test}}]\n` +
    tune('{rule: kfold, folds: 2}', '[{model.kk: smallest}, {model.k: largest}, {model.k: smallest}]'),
  [
    'p.yaml:11:66: error: tune.prefer does not say how ties on select.top are broken: every tuned setting needs its place in the tie order',
    '  hint: add `- select.top: smallest` (or largest, first-listed)',
    'p.yaml:11:68: error: tune.prefer names "model.kk", which is not a tuned setting',
    '  hint: did you mean `model.k`?',
    'p.yaml:11:109: error: tune.prefer lists model.k twice',
  ],
);
validates(
  'text values have no smallest one',
  `${split}model: {kind: logistic, options: {solver: [newton, newton-cg]}}\n${tune('{rule: kfold, folds: 2}', '[{model.solver: smallest}]')}`,
  ['p.yaml:10:82: error: model.solver has text values, which have no smallest one'],
);
validates(
  'two steps tuning the same setting, and a candidate value checked on its own',
  `${split}model: {kind: knn}\npreprocess: [{select: {top: [1, 2], by: f-test}}, {select: {top: [1, 2], by: f-test}}]\n` +
    tune('{rule: kfold, folds: 2}', '[{select.top: smallest}]'),
  [
    'p.yaml:10:66: error: two select steps tune select.top, so the name cannot tell them apart',
    'p.yaml:10:70: error: select keeps the top 2 features but only 1 are there',
  ],
);
validates(
  'a candidate value is checked on the inner training parts, located at the value',
  `${split}model: {kind: knn, options: {k: [3, 9]}}\n${tune('{rule: stratified-kfold, folds: 6}')}`,
  ['p.yaml:9:37: error: knn k is 9 but the smallest training part has 8 rows'],
);
validates(
  'the inner rule is checked on each outer training part',
  `${split}model: {kind: knn, options: {k: [1, 3]}}\n${tune('{rule: stratified-kfold, folds: 6}')}`,
  [
    'p.yaml:10:47: error: in the training part of repeat 1, fold 1 (10 rows), the inner split fails: class "x" has 5 rows, fewer than the 6 folds, so some folds would have none of it',
  ],
);
validates(
  'a grouped inner rule needs data.group',
  `${split}model: {kind: knn, options: {k: [1, 3]}}\n${tune('{rule: grouped-kfold, folds: 2}')}`,
  ['p.yaml:10:22: error: tune.split rule grouped-kfold needs data.group to name the group column'],
);
validates(
  'an inner split that ignores the groups is a warning',
  `  group: g\n${split}model: {kind: knn, options: {k: [1, 3]}}\n${tune('{rule: kfold, folds: 2}')}`,
  [
    'p.yaml:11:22: warning: the inner split (kfold) ignores data.group, so rows of one g can sit on both sides of an inner fold and flatter the candidates that memorize them',
  ],
  0,
);
validates(
  'a stable inner split that leaves a fold empty',
  `${split}model: {kind: knn, options: {k: [1, 3]}}\n${tune('{rule: kfold, folds: 5, assign: stable}')}`,
  ['p.yaml:10:15: error: in the training part of repeat 1, fold 1 (10 rows), the inner split fails: it leaves an inner fold without a row'],
);
validates(
  'an inner holdout without a test part',
  `${split}model: {kind: knn, options: {k: [1, 3]}}\n${tune('{rule: holdout, test-fraction: 0.01}')}`,
  ['p.yaml:10:15: error: in the training part of repeat 1, fold 1 (10 rows), the inner split fails: it leaves an inner part without a row'],
);
validates('a list of one value, a repeated value and an invalid value are schema errors', 'model: {kind: knn, options: {k: [0, 3, 3]}}\n', [
  'p.yaml:8:34: error: model.options.k[0] must be ≥ 1, not 0',
  'p.yaml:8:37: error: model.options.k lists the same item twice (items 3 and 2)',
]);
