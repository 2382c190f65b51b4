/** Protocol split settings × table → Assignment for every repeat. Pure. */
import type { RuleSplit } from './types.js';
import { SPLIT_VERSION, type Assignment } from './assignment.js';
import { splitRules } from './registry.js';
import type { SplitInput } from './rule.js';

/**
 * `within` makes it an inner split (spec §9): the rows are outer repeat R, fold F's training part,
 * and every key's repeat field reads `R.F.r`.
 */
export function assignFolds(input: SplitInput, split: RuleSplit, within?: { repeat: number; fold: number }): Assignment {
  const n = input.ids.length;
  const fold = new Int32Array(n * split.repeats);
  let folds = split.folds;
  for (let r = 1; r <= split.repeats; r++) {
    const out = splitRules[split.rule].fold(input, {
      folds: split.folds,
      seed: split.seed ?? 0,
      repeat: within ? `${within.repeat}.${within.fold}.${r}` : r,
      assign: split.assign,
      testMicros: Math.round((split.testFraction ?? 0) * 1e6),
    });
    fold.set(out.fold, (r - 1) * n);
    folds = out.folds;
  }
  // The table's own ids array (read-only), so its id order is computed once.
  return { version: SPLIT_VERSION, ids: input.ids as string[], repeats: split.repeats, folds, fold };
}
