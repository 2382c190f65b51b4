/**
 * Spec §4.4: fold 1 = test, fold 2 = train. Balanced: per class (UTF-8 order), the first
 * round-half-up(m × P / 10^6) rows in key order are test. Stable: a row is test when
 * prefix32(key) × 10^6 < P × 2^32.
 */
import { keyPrefix32, sortByKey } from '../key.js';
import { idKeysOf, type SplitRuleImpl } from '../rule.js';
import { rowsByClass } from './strata.js';

export function testCount(m: number, micros: number): number {
  return Math.floor((m * micros + 500000) / 1000000);
}

export const holdout: SplitRuleImpl = {
  description: 'one test part (fold 1) of test-fraction of the rows, per class in key order; the rest (fold 2) trains.',
  methods: (s) =>
    `a stratified hold-out split (${Math.round((s.testFraction ?? 0) * 100)} % of the samples for testing)${s.repeats > 1 ? `, repeated ${s.repeats} times` : ''}`,
  uses: { seed: true, folds: false, repeats: true, assign: true, testFraction: true, groups: false },
  tests: 'fold-1',
  keysIds: true,
  check: () => [],
  fold(input, p) {
    const n = input.ids.length;
    const keys = idKeysOf(input, p.seed, p.repeat);
    const fold = new Int32Array(n).fill(2);
    if (p.assign === 'stable') {
      const bound = p.testMicros * 4294967296; // < 2^53, exact in a double
      for (let i = 0; i < n; i++) if (keyPrefix32(keys, i) * 1000000 < bound) fold[i] = 1;
    } else {
      for (const rows of rowsByClass(input.y, input.classCount)) {
        const order = sortByKey(rows, keys, input.ids);
        const t = testCount(order.length, p.testMicros);
        for (let k = 0; k < t; k++) fold[order[k]] = 1;
      }
    }
    return { fold, folds: 2 };
  },
};
