/** split.rule → entry. Adding a rule: one file in rules/, one line here, and its section in docs/split-spec.md with test vectors. */
import type { SplitRuleImpl } from './rule.js';
import { groupedKfold } from './rules/grouped-kfold.js';
import { holdout } from './rules/holdout.js';
import { kfold } from './rules/kfold.js';
import { leaveGroupOut, leaveOneOut } from './rules/leave-out.js';
import { stratifiedKfold } from './rules/stratified-kfold.js';

const entries = {
  holdout,
  kfold,
  'stratified-kfold': stratifiedKfold,
  'grouped-kfold': groupedKfold,
  'leave-one-out': leaveOneOut,
  'leave-group-out': leaveGroupOut,
};

/** The split rule names: the registry's keys. */
export type SplitRule = keyof typeof entries;

export const splitRules: Record<SplitRule, SplitRuleImpl> = entries;

/** The protocol schema's `split.rule`, generated from the entries. */
export function splitRuleSchema(): Record<string, unknown> {
  return {
    description: `Split rule (docs/split-spec.md): ${Object.entries(splitRules)
      .map(([name, r]) => `${name} — ${r.description}`)
      .join(' ')}`,
    enum: Object.keys(splitRules),
  };
}
