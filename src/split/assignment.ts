/** A fold assignment as plain data: fold[(repeat - 1) * ids.length + row], 1-based folds and repeats. */
export const SPLIT_VERSION = 'split-v1';

export interface Assignment {
  version: typeof SPLIT_VERSION;
  /** Ids in the table's row order. */
  ids: string[];
  repeats: number;
  /** Number of folds K (2 for holdout: fold 1 = test, fold 2 = train). */
  folds: number;
  fold: Int32Array;
}

/** Rows of one repeat whose fold equals / differs from `fold`, in the given row order. */
export function foldRows(a: Assignment, repeat: number, fold: number, order: Int32Array): { test: Int32Array; train: Int32Array } {
  const rows = lazyRepeatRows(a, repeat, order)[fold - 1];
  return { test: rows.test, train: rows.train };
}

/**
 * foldRows of every fold of one repeat (index fold − 1): their test rows found in one pass over
 * the rows (a pass per fold was some 10 ms of a 100,000-row run of 10 folds), and the training
 * rows listed only when first read (a model fitted from class moments never reads them: a
 * million rows' five folds of training rows are 15 MB).
 */
export function lazyRepeatRows(a: Assignment, repeat: number, order: Int32Array): { test: Int32Array; readonly train: Int32Array }[] {
  const n = a.ids.length;
  const base = (repeat - 1) * n;
  const counts = new Int32Array(a.folds + 1);
  for (let i = 0; i < n; i++) counts[a.fold[base + i]]++;
  const tests = Array.from({ length: a.folds }, (_, f) => new Int32Array(counts[f + 1]));
  const filled = new Int32Array(a.folds + 1);
  for (let k = 0; k < n; k++) {
    const row = order[k];
    const f = a.fold[base + row];
    tests[f - 1][filled[f]++] = row;
  }
  return tests.map((test, f) => {
    const fold = f + 1;
    let train: Int32Array | undefined;
    return {
      test,
      get train() {
        if (!train) {
          train = new Int32Array(n - test.length);
          for (let k = 0, ri = 0; k < n; k++) if (a.fold[base + order[k]] !== fold) train[ri++] = order[k];
        }
        return train;
      },
    };
  });
}

/** (repeat, fold) pairs with no row: spec §8 rejects such an assignment (stable mode can draw one). */
export function emptyFolds(a: Assignment): { repeat: number; fold: number }[] {
  const n = a.ids.length;
  const out: { repeat: number; fold: number }[] = [];
  for (let r = 1; r <= a.repeats; r++) {
    const seen = new Uint8Array(a.folds + 1);
    for (let i = 0; i < n; i++) seen[a.fold[(r - 1) * n + i]] = 1;
    for (let f = 1; f <= a.folds; f++) if (!seen[f]) out.push({ repeat: r, fold: f });
  }
  return out;
}
