/** split.rule → implementation. Adding a rule: one file in rules/ and one line here (and a section in docs/split-spec.md). */
import type { SplitRule } from './types.js';
import type { SplitRuleImpl } from './rule.js';
import { groupedKfold } from './rules/grouped-kfold.js';
import { holdout } from './rules/holdout.js';
import { kfold } from './rules/kfold.js';
import { leaveGroupOut, leaveOneOut } from './rules/leave-out.js';
import { stratifiedKfold } from './rules/stratified-kfold.js';

export const splitRules: Record<SplitRule, SplitRuleImpl> = {
  holdout,
  kfold,
  'stratified-kfold': stratifiedKfold,
  'grouped-kfold': groupedKfold,
  'leave-one-out': leaveOneOut,
  'leave-group-out': leaveGroupOut,
};
