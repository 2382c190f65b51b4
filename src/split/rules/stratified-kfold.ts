/**
 * Spec §4.2: classes in UTF-8 byte order, rows of each class in key order, all
 * concatenated and dealt round-robin with one running counter, so both per-class
 * counts and fold sizes differ by at most 1. Stable mode is the k-fold stable rule.
 */
import { keyPrefix32, sortByKey } from '../key.js';
import { idKeysOf, type SplitRuleImpl } from '../rule.js';
import { rowsByClass } from './strata.js';

export const stratifiedKfold: SplitRuleImpl = {
  keysIds: true,
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
