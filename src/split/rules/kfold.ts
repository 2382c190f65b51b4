/** Spec §4.1: deal rows in key order round-robin (balanced), or key prefix mod k (stable). */
import { keyPrefix32, sortByKey } from '../key.js';
import { allRows, foldsWithinRows, idKeysOf, type SplitRuleImpl } from '../rule.js';

export const kfold: SplitRuleImpl = {
  description: 'rows dealt into k folds in the order of their SHA-256 keys, ignoring the label.',
  methods: (s) => `${s.folds}-fold cross-validation${s.repeats > 1 ? `, repeated ${s.repeats} times with different fold assignments` : ''}`,
  uses: { seed: true, folds: true, repeats: true, assign: true, testFraction: false, groups: false },
  tests: 'every-fold',
  keysIds: true,
  check: foldsWithinRows,
  fold(input, p) {
    const n = input.ids.length;
    const keys = idKeysOf(input, p.seed, p.repeat);
    const fold = new Int32Array(n);
    if (p.assign === 'stable') {
      for (let i = 0; i < n; i++) fold[i] = (keyPrefix32(keys, i) % p.folds) + 1;
    } else {
      const order = sortByKey(allRows(n), keys, input.ids);
      for (let pos = 0; pos < n; pos++) fold[order[pos]] = (pos % p.folds) + 1;
    }
    return { fold, folds: p.folds };
  },
};
