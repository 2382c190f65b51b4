/** The numeric cells of chosen columns, row-major, parsed straight from the bytes; missing tokens become NaN. */
import { error, type Problem } from '../problems/problem.js';
import { cellPosition, type DelimitedTable } from './delimited.js';
import { parseNumberBytes } from './number.js';

const MAX_LISTED = 20;

export function numericCells(t: DelimitedTable, columns: readonly number[], missing: ReadonlySet<string>, file: string): { data: Float64Array; problems: Problem[] } {
  const width = columns.length;
  const data = new Float64Array(t.rows * width);
  const problems: Problem[] = [];
  let bad = 0;
  // Row by row, so the bytes are read in file order.
  for (let r = 0; r < t.rows; r++) {
    const base = r * t.cols;
    for (let j = 0; j < width; j++) {
      const c = columns[j];
      const k = base + c;
      let v = parseNumberBytes(t.bytes, t.starts[k], t.ends[k]);
      if (v !== v) {
        const text = new TextDecoder().decode(t.bytes.subarray(t.starts[k], t.ends[k]));
        if (missing.has(text)) v = NaN;
        else if (bad++ < MAX_LISTED) {
          problems.push(error('data-not-a-number', `cell "${text}" in column "${t.header[c]}" (row ${r + 1}) is not a number`, { file, position: cellPosition(t, r, c), hint: text.includes(',') ? 'use a dot as the decimal separator' : 'list the token under data.missing if it marks a missing value' }));
        }
      }
      data[r * width + j] = v;
    }
  }
  if (bad > MAX_LISTED) problems.push(error('data-not-a-number', `${bad - MAX_LISTED} more non-numeric cells not listed`, { file }));
  return { data, problems };
}
