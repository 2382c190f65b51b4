/**
 * Spec §4.2: classes in UTF-8 byte order, rows of each class in key order, all
 * concatenated and dealt round-robin with one running counter, so both per-class
 * counts and fold sizes differ by at most 1. Stable mode is the k-fold stable rule.
 */
import { keyPrefix32, sortByKey } from '../key.js';
import { foldsWithinRows, idKeysOf, type SplitRuleImpl } from '../rule.js';
import { rowsByClass } from './strata.js';

export const stratifiedKfold: SplitRuleImpl = {
  description: 'k folds whose class counts differ by at most one (each class dealt in key order, one running counter).',
  methods: (s) =>
    `${s.folds}-fold stratified cross-validation${s.repeats > 1 ? `, repeated ${s.repeats} times with different fold assignments` : ''}`,
  uses: { seed: true, folds: true, repeats: true, assign: true, testFraction: false, groups: false },
  tests: 'every-fold',
  keysIds: true,
  check(split, data) {
    const tooMany = foldsWithinRows(split, data);
    if (tooMany.length || split.assign !== 'balanced') return tooMany;
    const fewest = Math.min(...data.classCounts);
    return data.classes.flatMap((c, k) => {
      const m = data.classCounts[k];
      return m < split.folds
        ? [
            {
              code: 'class-smaller-than-folds' as const,
              message:
                `class "${c}" has ${m} row${m === 1 ? '' : 's'}, fewer than the ${split.folds} folds, so some folds would ` +
                `have none of it`,
              path: ['split', 'folds'],
              hint: `use at most ${fewest} folds`,
            },
          ]
        : [];
    });
  },
  fold(input, p) {
    const n = input.ids.length;
    const keys = idKeysOf(input, p.seed, p.repeat);
    const fold = new Int32Array(n);
    if (p.assign === 'stable') {
      for (let i = 0; i < n; i++) fold[i] = (keyPrefix32(keys, i) % p.folds) + 1;
      return { fold, folds: p.folds };
    }
    let counter = 0;
    for (const rows of rowsByClass(input.y, input.classCount)) {
      const order = sortByKey(rows, keys, input.ids);
      for (let k = 0; k < order.length; k++) fold[order[k]] = (counter++ % p.folds) + 1;
    }
    return { fold, folds: p.folds };
  },
};
