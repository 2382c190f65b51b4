/**
 * Rows that are the same sample twice: identical feature vectors under different ids, and near
 * duplicates (technical replicates) whose standardized profiles correlate above a threshold.
 * A copy of a test row in the training part makes the test row easy. Pure.
 */
import type { Matrix } from '../table/matrix.js';
import { note, warning, type Problem } from '../problems/problem.js';
import { AUDIT_CODE } from './kinds.js';
import { type AuditInput, listed, plural, repeatsSpanned, rowAt } from './input.js';
import { AUDIT_THRESHOLDS } from './thresholds.js';
import { sortFloat64 } from '../util/sort-float64.js';
import { featureHashes } from '../table/row-digest.js';

function sameCell(a: number, b: number): boolean {
  return a === b || (a !== a && b !== b);
}

function rowsEqual(X: Matrix, i: number, j: number): boolean {
  const c = X.cols;
  for (let k = 0; k < c; k++) if (!sameCell(X.data[i * c + k], X.data[j * c + k])) return false;
  return true;
}

/**
 * Sets of rows (ascending, two or more) with identical feature vectors, ordered by their first
 * row. Candidates are found by the rows' featureHashes (equal rows hash alike: −0 as 0, every NaN
 * as one), then compared cell by cell.
 */
export function exactDuplicateSets(X: Matrix, names: readonly string[], packBelow = 2097152): Int32Array[] {
  const { rows } = X;
  const hashes = featureHashes(X, names);
  const hash = new Uint32Array(rows);
  for (let r = 0; r < rows; r++) hash[r] = hashes[2 * r];
  let order: Int32Array;
  if (rows < packBelow) {
    // (hash, row) pairs packed into one exact double (32 + 21 bits < 2^53) sort as numbers; from
    // 2^21 rows on, the row would spill into the hash, and a comparison sort takes over.
    const packed = new Float64Array(rows);
    for (let r = 0; r < rows; r++) packed[r] = hash[r] * 2097152 + r;
    sortFloat64(packed);
    order = new Int32Array(rows);
    for (let r = 0; r < rows; r++) order[r] = packed[r] % 2097152;
  } else order = Int32Array.from({ length: rows }, (_, r) => r).sort((a, b) => hash[a] - hash[b] || a - b);
  const sets: Int32Array[] = [];
  for (let s = 0; s < rows; ) {
    let e = s + 1;
    while (e < rows && hash[order[e]] === hash[order[s]]) e++;
    // A hash of one row (nearly all of them): nothing to split.
    if (e - s === 1) {
      s = e;
      continue;
    }
    // Rows of one hash may still differ: split the run into classes of equal rows.
    const left = Array.from(order.subarray(s, e));
    while (left.length > 1) {
      const head = left.shift()!;
      const same = [head];
      for (let i = left.length - 1; i >= 0; i--) if (rowsEqual(X, head, left[i])) same.push(...left.splice(i, 1));
      if (same.length > 1) sets.push(Int32Array.from(same).sort());
    }
    s = e;
  }
  return sets.sort((a, b) => a[0] - b[0]);
}

/**
 * Row pairs (i < j) whose standardized feature profiles correlate at or above `threshold`:
 * each feature centred and scaled over all rows (missing values at the mean), then the Pearson
 * correlation of the two rows across features. Constant features are left out.
 */
export function nearDuplicatePairs(X: Matrix, threshold: number): { i: number; j: number; r: number }[] {
  const { rows, cols, data } = X;
  const keep: number[] = [];
  const mean = new Float64Array(cols);
  const sd = new Float64Array(cols);
  for (let c = 0; c < cols; c++) {
    let n = 0;
    let m = 0;
    let s = 0;
    for (let r = 0; r < rows; r++) {
      const v = data[r * cols + c];
      if (v !== v) continue;
      n++;
      const d = v - m;
      m += d / n;
      s += d * (v - m);
    }
    mean[c] = m;
    sd[c] = n > 1 ? Math.sqrt(s / (n - 1)) : 0;
    if (sd[c] > 0) keep.push(c);
  }
  const p = keep.length;
  // Each row's profile, centred across its features and scaled to unit length: a dot product is then a correlation.
  const z = new Float64Array(rows * p);
  const usable = new Uint8Array(rows);
  for (let r = 0; r < rows; r++) {
    let rowMean = 0;
    for (let k = 0; k < p; k++) {
      const c = keep[k];
      const v = data[r * cols + c];
      const zv = v !== v ? 0 : (v - mean[c]) / sd[c];
      z[r * p + k] = zv;
      rowMean += zv;
    }
    rowMean /= p;
    let norm = 0;
    for (let k = 0; k < p; k++) {
      const d = z[r * p + k] - rowMean;
      z[r * p + k] = d;
      norm += d * d;
    }
    if (norm > 0) {
      usable[r] = 1;
      const inv = 1 / Math.sqrt(norm);
      for (let k = 0; k < p; k++) z[r * p + k] *= inv;
    }
  }
  const out: { i: number; j: number; r: number }[] = [];
  for (let i = 0; i < rows; i++) {
    if (!usable[i]) continue;
    const a = i * p;
    for (let j = i + 1; j < rows; j++) {
      if (!usable[j]) continue;
      const b = j * p;
      let s0 = 0;
      let s1 = 0;
      let s2 = 0;
      let s3 = 0;
      let k = 0;
      for (; k + 3 < p; k += 4) {
        s0 += z[a + k] * z[b + k];
        s1 += z[a + k + 1] * z[b + k + 1];
        s2 += z[a + k + 2] * z[b + k + 2];
        s3 += z[a + k + 3] * z[b + k + 3];
      }
      for (; k < p; k++) s0 += z[a + k] * z[b + k];
      const r = s0 + s1 + s2 + s3;
      if (r >= threshold) out.push({ i, j, r: Math.min(1, r) });
    }
  }
  return out;
}

function idsOf(input: AuditInput, rows: ArrayLike<number>): string[] {
  return Array.from(rows, (r) => `"${input.table.ids[r]}"`);
}

export function duplicateFindings(input: AuditInput, nearBudget: number = AUDIT_THRESHOLDS.nearMaxWork): Problem[] {
  const { table, assignment } = input;
  const out: Problem[] = [];
  const sets = exactDuplicateSets(table.X, table.featureNames);
  const inSet = new Int32Array(table.X.rows).fill(-1);
  sets.forEach((set, s) => {
    for (const r of set) inSet[r] = s;
    const labels = [...new Set(Array.from(set, (r) => table.labels[r]))];
    const spanned = repeatsSpanned(assignment, set);
    const what = `${plural(set.length, 'row')} with ids ${listed(idsOf(input, set))} have identical features`;
    const labelNote = labels.length > 1 ? ` and different labels (${labels.join(', ')})` : '';
    if (spanned.length)
      out.push(
        warning(
          AUDIT_CODE.duplicates,
          `${what}${labelNote}; they fall in different folds in ${plural(spanned.length, 'repeat')} ` +
            `(first: repeat ${spanned[0]}), so a copy of a test row is in the training part`,
          {
            ...rowAt(input, set[0]),
            hint: 'drop the copies, or give the copies one group value and split with grouped-kfold (data.group)',
          },
        ),
      );
    else
      out.push(
        note(AUDIT_CODE.duplicates, `${what}${labelNote}; they always share a fold, so no copy crosses into training`, {
          ...rowAt(input, set[0]),
          hint: 'copies still weigh twice in training; drop them if they are the same sample',
        }),
      );
  });
  out.push(...nearFindings(input, inSet, nearBudget));
  return out;
}

/** Whether near duplicates are searched for a table of this size (enough features, within the work budget). */
export function nearSearched(rows: number, cols: number, budget: number = AUDIT_THRESHOLDS.nearMaxWork): boolean {
  const t = AUDIT_THRESHOLDS;
  return cols >= t.nearMinFeatures && rows >= 2 && (rows * rows * cols) / 2 <= budget;
}

function nearFindings(input: AuditInput, inSet: Int32Array, budget: number): Problem[] {
  const { table, assignment } = input;
  const { rows, cols } = table.X;
  const t = AUDIT_THRESHOLDS;
  if (!nearSearched(rows, cols, budget)) return [];
  const out: Problem[] = [];
  for (const { i, j, r } of nearDuplicatePairs(table.X, t.nearCorrelation)) {
    if (inSet[i] >= 0 && inSet[i] === inSet[j]) continue;
    const spanned = repeatsSpanned(assignment, [i, j]);
    const what =
      `rows "${table.ids[i]}" and "${table.ids[j]}" have standardized profiles correlated at ${r.toFixed(4)} ` +
      `(≥ ${t.nearCorrelation}): replicates of one sample?`;
    out.push(
      spanned.length
        ? warning(AUDIT_CODE['near-duplicates'], `${what} They fall in different folds in ${plural(spanned.length, 'repeat')}`, {
            ...rowAt(input, i),
            hint: 'if they are replicates, give them one group value and split with grouped-kfold (data.group)',
          })
        : note(AUDIT_CODE['near-duplicates'], `${what} They always share a fold`, rowAt(input, i)),
    );
  }
  return out;
}
