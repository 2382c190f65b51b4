import fc from 'fast-check';
import t from 'tap';
import { assignFolds } from '../../src/split/assign.js';
import type { SplitRule } from '../../src/protocol/types.js';

interface RandomTable {
  ids: string[];
  y: Int32Array;
  groups: string[];
  classCount: number;
}

const tableArb = (minRows: number) =>
  fc.uniqueArray(fc.string({ minLength: 1, maxLength: 6, unit: 'grapheme' }), { minLength: minRows, maxLength: 60 }).chain((ids) =>
    fc
      .tuple(
        fc.array(fc.integer({ min: 0, max: 2 }), { minLength: ids.length, maxLength: ids.length }),
        fc.array(fc.integer({ min: 0, max: 7 }), { minLength: ids.length, maxLength: ids.length }),
      )
      .map(
        ([labels, groups]): RandomTable => ({
          ids,
          y: Int32Array.from(labels),
          groups: groups.map((g) => `g${g}`),
          classCount: 3,
        }),
      ),
  );

const split = (rule: SplitRule, folds: number, seed: number, assign: 'balanced' | 'stable' = 'balanced', repeats = 1) => ({
  rule,
  folds,
  repeats,
  seed,
  assign,
});

function counts(fold: Int32Array, k: number, y?: Int32Array, cls?: number): number[] {
  const c = new Array<number>(k).fill(0);
  fold.forEach((f, i) => {
    if (y === undefined || y[i] === cls) c[f - 1]++;
  });
  return c;
}
const spread = (c: number[]) => Math.max(...c) - Math.min(...c);

t.test('balanced stratified k-fold: fold sizes and every class count differ by at most 1', async (t) => {
  fc.assert(
    fc.property(tableArb(2), fc.integer({ min: 2, max: 7 }), fc.nat(), (tb, k, seed) => {
      const a = assignFolds(tb, split('stratified-kfold', k, seed));
      if (spread(counts(a.fold, k)) > 1) return false;
      for (let c = 0; c < 3; c++) if (spread(counts(a.fold, k, tb.y, c)) > 1) return false;
      return true;
    }),
    { numRuns: 300 },
  );
  t.pass('property held');
});

t.test('balanced k-fold: fold sizes differ by at most 1', async (t) => {
  fc.assert(
    fc.property(
      tableArb(2),
      fc.integer({ min: 2, max: 7 }),
      fc.nat(),
      (tb, k, seed) => spread(counts(assignFolds(tb, split('kfold', k, seed)).fold, k)) <= 1,
    ),
    { numRuns: 300 },
  );
  t.pass('property held');
});

t.test('stable mode: removing rows never moves a remaining row', async (t) => {
  fc.assert(
    fc.property(
      tableArb(3),
      fc.integer({ min: 2, max: 7 }),
      fc.nat(),
      fc.array(fc.boolean(), { minLength: 60, maxLength: 60 }),
      fc.constantFrom<SplitRule>('kfold', 'stratified-kfold', 'grouped-kfold', 'holdout'),
      (tb, k, seed, keep, rule) => {
        const s = { ...split(rule, k, seed, 'stable', 2), testFraction: 0.3 };
        const full = assignFolds(tb, s);
        const rows = tb.ids.map((_, i) => i).filter((i) => keep[i]);
        const sub = assignFolds(
          {
            ids: rows.map((i) => tb.ids[i]),
            y: Int32Array.from(rows.map((i) => tb.y[i])),
            groups: rows.map((i) => tb.groups[i]),
            classCount: 3,
          },
          s,
        );
        const n = tb.ids.length;
        return rows.every((i, j) => full.fold[i] === sub.fold[j] && full.fold[n + i] === sub.fold[rows.length + j]);
      },
    ),
    { numRuns: 300 },
  );
  t.pass('property held');
});

t.test('grouped rules: a group never spans two folds', async (t) => {
  fc.assert(
    fc.property(
      tableArb(2),
      fc.integer({ min: 2, max: 4 }),
      fc.nat(),
      fc.constantFrom<'balanced' | 'stable'>('balanced', 'stable'),
      fc.constantFrom<SplitRule>('grouped-kfold', 'leave-group-out'),
      (tb, k, seed, mode, rule) => {
        const a = assignFolds(tb, split(rule, k, seed, mode));
        const seen = new Map<string, number>();
        return tb.groups.every((g, i) => {
          if (seen.has(g)) return seen.get(g) === a.fold[i];
          seen.set(g, a.fold[i]);
          return true;
        });
      },
    ),
    { numRuns: 300 },
  );
  t.pass('property held');
});

t.test('row order never matters: a permuted table gets the same fold per id', async (t) => {
  fc.assert(
    fc.property(
      tableArb(2),
      fc.integer({ min: 2, max: 5 }),
      fc.nat(),
      fc.constantFrom<SplitRule>('kfold', 'stratified-kfold', 'grouped-kfold', 'holdout', 'leave-one-out', 'leave-group-out'),
      (tb, k, seed, rule) => {
        const perm = tb.ids.map((_, i) => i).reverse();
        perm.push(perm.shift()!);
        const s = { ...split(rule, k, seed), testFraction: 0.25 };
        const a = assignFolds(tb, s);
        const b = assignFolds(
          {
            ids: perm.map((i) => tb.ids[i]),
            y: Int32Array.from(perm.map((i) => tb.y[i])),
            groups: perm.map((i) => tb.groups[i]),
            classCount: 3,
          },
          s,
        );
        return perm.every((i, j) => a.fold[i] === b.fold[j]);
      },
    ),
    { numRuns: 300 },
  );
  t.pass('property held');
});

t.test('repeats are independent draws: with 3 repeats of 40 rows the repeats are not all equal', async (t) => {
  const ids = Array.from({ length: 40 }, (_, i) => `id${i}`);
  const a = assignFolds({ ids, y: new Int32Array(40), classCount: 1 }, split('kfold', 4, 11, 'balanced', 3));
  t.not(a.fold.subarray(0, 40).join(), a.fold.subarray(40, 80).join());
  t.not(a.fold.subarray(40, 80).join(), a.fold.subarray(80, 120).join());
});

// The plans' rows: every fold's test rows of a repeat, made in one pass, are the rows of that fold
// in the given order, and its training rows the rest (checked against a filter per fold).
t.test('every fold of a repeat in one pass: the same rows as one filter per fold', async () => {
  const { lazyRepeatRows, SPLIT_VERSION } = await import('../../src/split/assignment.js');
  fc.assert(
    fc.property(
      fc.integer({ min: 1, max: 40 }),
      fc.integer({ min: 2, max: 6 }),
      fc.integer({ min: 1, max: 3 }),
      fc.integer({ min: 0, max: 1e6 }),
      (n, folds, repeats, seed) => {
        let s = seed;
        const next = () => (s = (s * 1103515245 + 12345) % 2147483648);
        const fold = Int32Array.from({ length: n * repeats }, () => 1 + (next() % folds));
        const order = Int32Array.from({ length: n }, (_, i) => i).sort(
          (a, b) => ((a * 7919 + seed) % n) - ((b * 7919 + seed) % n) || a - b,
        );
        const a = {
          version: SPLIT_VERSION as typeof SPLIT_VERSION,
          ids: Array.from({ length: n }, (_, i) => `r${i}`),
          repeats,
          folds,
          fold,
        };
        for (let r = 1; r <= repeats; r++) {
          const all = lazyRepeatRows(a, r, order);
          for (let f = 1; f <= folds; f++) {
            const inFold = (row: number) => fold[(r - 1) * n + row] === f;
            if (String([...all[f - 1].test]) !== String([...order].filter(inFold))) return false;
            if (String([...all[f - 1].train]) !== String([...order].filter((row) => !inFold(row)))) return false;
          }
        }
        return true;
      },
    ),
  );
});
