/** The settings a split rule is given (the protocol's split section, normalized). Types only. */
export type { SplitRule } from './registry.js';
import type { SplitRule } from './registry.js';
export type AssignMode = 'balanced' | 'stable';

export interface RuleSplit {
  rule: SplitRule;
  folds: number;
  repeats: number;
  seed?: number;
  assign: AssignMode;
  testFraction?: number;
}
