import { deriveKeys } from './key.js';
import type { AssignMode } from './types.js';

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

/** split-v1 keys of the input's ids for one repeat (spec §2). */
export function idKeysOf(input: SplitInput, seed: number, repeat: number): Uint8Array {
  return input.idKeys?.(seed, repeat) ?? deriveKeys(input.ids, seed, repeat);
}

export interface SplitParams {
  folds: number;
  seed: number;
  repeat: number;
  assign: AssignMode;
  /** Holdout test share in millionths (an exact integer, spec §5). */
  testMicros: number;
}

/** A split rule: one repeat's fold per row (1-based), and the number of folds it produced. */
export interface SplitRuleImpl {
  /** True for rules that key rows by their ids (idKeysOf), so the shell may derive those keys ahead. */
  keysIds?: true;
  fold(input: SplitInput, params: SplitParams): { fold: Int32Array; folds: number };
}

export function allRows(n: number): Int32Array {
  const rows = new Int32Array(n);
  for (let i = 0; i < n; i++) rows[i] = i;
  return rows;
}
