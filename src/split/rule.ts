import type { ProblemCode } from '../problems/codes.js';
import { deriveKeys } from './key.js';
import type { AssignMode, RuleSplit } from './types.js';

/** What a split rule sees: ids, label codes (classes in UTF-8 byte order), optional group values. */
export interface SplitInput {
  ids: readonly string[];
  y: Int32Array;
  classCount: number;
  groups?: readonly string[];
  /**
   * Keys of the ids already derived elsewhere (the shell may derive them on two threads), or
   * undefined; they must equal deriveKeys(ids, seed, repeat).
   */
  idKeys?: (seed: number, repeat: number) => Uint8Array | undefined;
}

/** split-v1 keys of the input's ids for one repeat (spec §2), or for an inner split's `R.F.r` repeat field (spec §9). */
export function idKeysOf(input: SplitInput, seed: number, repeat: number | string): Uint8Array {
  return (typeof repeat === 'number' ? input.idKeys?.(seed, repeat) : undefined) ?? deriveKeys(input.ids, seed, repeat);
}

export interface SplitParams {
  folds: number;
  seed: number;
  /** The repeat field of every key: the repeat number, or `R.F.r` for inner repeat r inside outer repeat R, fold F (spec §9). */
  repeat: number | string;
  assign: AssignMode;
  /** Holdout test share in millionths (an exact integer, spec §5). */
  testMicros: number;
}

/** The split settings a rule may read; the protocol checks, schema and docs follow from which ones it declares. */
export interface RuleUses {
  /** Draws SHA-256 keys from `seed` (then the seed is required). */
  seed: boolean;
  /** Reads `folds` (otherwise the rule sets the number of folds itself). */
  folds: boolean;
  /** Can draw more than one assignment (`repeats` > 1). */
  repeats: boolean;
  /** Reads `assign` (balanced or stable). */
  assign: boolean;
  /** Reads `test-fraction` (then it is required). */
  testFraction: boolean;
  /** Needs `data.group`. */
  groups: boolean;
}

/** What a rule's data check sees: row count, rows per class, and the number of distinct groups (when data.group is set). */
export interface RuleData {
  rows: number;
  classCounts: Int32Array;
  classes: readonly string[];
  groupCount?: number;
}

/** A problem a rule finds in its settings against the data; `path` is the protocol path it is located at. */
export interface RuleProblem {
  code: ProblemCode;
  message: string;
  path: (string | number)[];
  hint?: string;
}

/** A split rule's entry: what it is, which settings it reads, its checks against the data, and its assignment. */
export interface SplitRuleImpl {
  /** One sentence for the schema and docs/protocol.md. */
  readonly description: string;
  /** The design as a methods section names it, e.g. "5-fold stratified cross-validation, repeated 2 times". */
  methods(split: { folds: number; repeats: number; testFraction?: number; group?: string }): string;
  readonly uses: Readonly<RuleUses>;
  /** 'every-fold': each fold is tested once with the others training; 'fold-1': fold 1 is the test part, fold 2 trains. */
  readonly tests: 'every-fold' | 'fold-1';
  /** True for rules that key rows by their ids (idKeysOf), so the shell may derive those keys ahead. */
  readonly keysIds: boolean;
  /** Problems of the settings against the data, before any fold is drawn (data.group is known to be present when uses.groups). */
  check(split: RuleSplit, data: RuleData): RuleProblem[];
  /** One repeat's fold per row (1-based), and the number of folds it produced. */
  fold(input: SplitInput, params: SplitParams): { fold: Int32Array; folds: number };
}

/** The check every k-fold rule shares: no more folds than there are rows. */
export function foldsWithinRows(split: RuleSplit, data: RuleData): RuleProblem[] {
  return split.folds > data.rows
    ? [{ code: 'too-many-folds', message: `folds is ${split.folds} but the data has only ${data.rows} rows`, path: ['split', 'folds'] }]
    : [];
}

export function allRows(n: number): Int32Array {
  const rows = new Int32Array(n);
  for (let i = 0; i < n; i++) rows[i] = i;
  return rows;
}
