/**
 * Spec §4.3: keys are drawn from group values. Balanced: groups by size (largest first),
 * equal sizes in key order, each to the fold holding the fewest rows so far (lowest
 * fold number on ties). Stable: group key prefix mod k.
 */
import { compareUtf8 } from '../../util/bytes.js';
import { compareKeys, deriveKeys, keyPrefix32 } from '../key.js';
import type { SplitRuleImpl } from '../rule.js';
import { groupIndex } from './strata.js';

export const groupedKfold: SplitRuleImpl = {
  description:
    'k folds of whole groups (data.group): all rows of a group share a fold; balanced puts the largest groups first, each into ' +
    'the fold with the fewest rows.',
  methods: (s) =>
    `${s.folds}-fold grouped cross-validation (all samples of one ${s.group ?? 'group'} in the same fold)${s.repeats > 1 ? `, repeated ${s.repeats} times with different fold assignments` : ''}`,
  uses: { seed: true, folds: true, repeats: true, assign: true, testFraction: false, groups: true },
  tests: 'every-fold',
  keysIds: false,
  check(split, data) {
    const groups = data.groupCount!;
    return split.folds > groups
      ? [{ code: 'too-many-folds', message: `folds is ${split.folds} but the data has only ${groups} groups`, path: ['split', 'folds'] }]
      : [];
  },
  fold(input, p) {
    const n = input.ids.length;
    const { names, of } = groupIndex(input.groups!, compareUtf8);
    const keys = deriveKeys(names, p.seed, p.repeat);
    const groupFold = new Int32Array(names.length);
    if (p.assign === 'stable') {
      for (let g = 0; g < names.length; g++) groupFold[g] = (keyPrefix32(keys, g) % p.folds) + 1;
    } else {
      const size = new Int32Array(names.length);
      for (let i = 0; i < n; i++) size[of[i]]++;
      const order = Array.from(names, (_, g) => g).sort((a, b) => size[b] - size[a] || compareKeys(keys, names, a, b));
      const load = new Float64Array(p.folds);
      for (const g of order) {
        let best = 0;
        for (let f = 1; f < p.folds; f++) if (load[f] < load[best]) best = f;
        groupFold[g] = best + 1;
        load[best] += size[g];
      }
    }
    const fold = new Int32Array(n);
    for (let i = 0; i < n; i++) fold[i] = groupFold[of[i]];
    return { fold, folds: p.folds };
  },
};
