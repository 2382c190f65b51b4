/** Spec §4.5–4.6: no keys. Fold = 1-based rank of the id (or of the group value) in UTF-8 byte order. */
import { compareUtf8 } from '../../util/bytes.js';
import { idOrder } from '../key.js';
import type { SplitRuleImpl } from '../rule.js';
import { groupIndex } from './strata.js';

export const leaveOneOut: SplitRuleImpl = {
  description: 'every row is its own fold (fold number = rank of the id in UTF-8 byte order); no seed.',
  methods: () => 'leave-one-out cross-validation',
  uses: { seed: false, folds: false, repeats: false, assign: false, testFraction: false, groups: false },
  tests: 'every-fold',
  keysIds: false,
  check: () => [],
  fold(input) {
    const order = idOrder(input.ids);
    const fold = new Int32Array(order.length);
    for (let rank = 0; rank < order.length; rank++) fold[order[rank]] = rank + 1;
    return { fold, folds: order.length };
  },
};

export const leaveGroupOut: SplitRuleImpl = {
  description: 'every group (data.group) is its own fold, numbered by the rank of the group value in UTF-8 byte order; no seed.',
  methods: (s) => `leave-one-group-out cross-validation (each ${s.group ?? 'group'} held out in turn)`,
  uses: { seed: false, folds: false, repeats: false, assign: false, testFraction: false, groups: true },
  tests: 'every-fold',
  keysIds: false,
  check(_split, data) {
    const groups = data.groupCount!;
    return groups < 2
      ? [{ code: 'too-few-groups', message: `leave-group-out needs at least 2 groups; the data has ${groups}`, path: ['data', 'group'] }]
      : [];
  },
  fold(input) {
    const { names, of } = groupIndex(input.groups!, compareUtf8);
    const fold = new Int32Array(of.length);
    for (let i = 0; i < of.length; i++) fold[i] = of[i] + 1;
    return { fold, folds: names.length };
  },
};
