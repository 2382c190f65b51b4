/** Problems for the numeric cells that did not parse: missing tokens become NaN, anything else is reported. */
import { error, type Problem } from '../problems/problem.js';
import { cellAt, type Extracted, type Grid } from './grid.js';

const MAX_LISTED = 1000;

/** `columns` are the grid columns behind the extract's number columns, in the same order. */
export function numberProblems(
  grid: Grid,
  extracted: Extracted,
  columns: readonly number[],
  missing: ReadonlySet<string>,
  file: string,
): Problem[] {
  const width = columns.length;
  const problems: Problem[] = [];
  let bad = 0;
  for (const k of extracted.failed) {
    const r = Math.floor(k / width);
    const c = columns[k % width];
    const text = grid.text(r, c);
    if (missing.has(text)) continue;
    if (bad++ < MAX_LISTED) {
      problems.push(
        error('data-not-a-number', `cell "${text}" in column "${grid.header[c]}" (row ${r + 1}) is not a number`, {
          ...cellAt(grid, r, c, file),
          hint: text.includes(',') ? 'use a dot as the decimal separator' : 'list the token under data.missing if it marks a missing value',
        }),
      );
    }
  }
  if (bad > MAX_LISTED) problems.push(error('data-not-a-number', `${bad - MAX_LISTED} more non-numeric cells not listed`, { file }));
  if (!extracted.inRange) problems.push(...rangeProblems(grid, extracted.numbers, columns, file));
  return problems;
}

/**
 * The magnitudes foldseal computes with safely: 0, or 1e-150 ≤ |x| ≤ 1e150. Squares and sums of
 * squares of such values stay finite and normal, so no model or summary overflows to Infinity or
 * underflows to 0 (documented in docs/protocol.md, "Numbers").
 */
export const MAX_MAGNITUDE = 1e150;
export const MIN_MAGNITUDE = 1e-150;

/** A number foldseal computes with safely: finite, and 0 or 1e-150 ≤ |x| ≤ 1e150 (false for NaN). */
export function inSafeRange(v: number): boolean {
  const a = v < 0 ? -v : v;
  return a <= MAX_MAGNITUDE && (a >= MIN_MAGNITUDE || a === 0);
}

export function rangeProblems(grid: Grid, numbers: Float64Array, columns: readonly number[], file: string): Problem[] {
  const width = columns.length;
  const problems: Problem[] = [];
  let bad = 0;
  for (let k = 0; k < numbers.length; k++) {
    const v = numbers[k];
    const a = v < 0 ? -v : v;
    if (!(a > MAX_MAGNITUDE || (a < MIN_MAGNITUDE && a !== 0))) continue;
    if (bad++ >= MAX_LISTED) continue;
    const r = Math.floor(k / width);
    const c = columns[k % width];
    const text = grid.text(r, c);
    const why =
      a === Infinity
        ? 'is beyond the range of a double-precision number'
        : `is outside the range foldseal computes with safely (0, or 1e-150 to 1e150 in magnitude)`;
    problems.push(
      error('data-out-of-range', `cell "${text}" in column "${grid.header[c]}" (row ${r + 1}) ${why}`, {
        ...cellAt(grid, r, c, file),
        hint: 'rescale the column (another unit, or a logarithm) before foldseal reads it',
      }),
    );
  }
  if (bad > MAX_LISTED) problems.push(error('data-out-of-range', `${bad - MAX_LISTED} more cells out of range not listed`, { file }));
  return problems;
}
