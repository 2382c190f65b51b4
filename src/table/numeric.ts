/** Problems for the numeric cells that did not parse: missing tokens become NaN, anything else is reported. */
import { error, type Problem } from '../problems/problem.js';
import type { Extracted, Grid } from './grid.js';

const MAX_LISTED = 20;

/** `columns` are the grid columns behind the extract's number columns, in the same order. */
export function numberProblems(grid: Grid, extracted: Extracted, columns: readonly number[], missing: ReadonlySet<string>, file: string): Problem[] {
  const width = columns.length;
  const problems: Problem[] = [];
  let bad = 0;
  for (const k of extracted.failed) {
    const r = Math.floor(k / width);
    const c = columns[k % width];
    const text = grid.text(r, c);
    if (missing.has(text)) continue;
    if (bad++ < MAX_LISTED) {
      problems.push(error('data-not-a-number', `cell "${text}" in column "${grid.header[c]}" (row ${r + 1}) is not a number`, { file, position: grid.position(r, c), hint: text.includes(',') ? 'use a dot as the decimal separator' : 'list the token under data.missing if it marks a missing value' }));
    }
  }
  if (bad > MAX_LISTED) problems.push(error('data-not-a-number', `${bad - MAX_LISTED} more non-numeric cells not listed`, { file }));
  return problems;
}
