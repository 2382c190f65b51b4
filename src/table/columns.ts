/**
 * A table decoded column by column (a Parquet file): numeric columns as Float64Array (NaN where a
 * value is null), other columns as text. Seen as a Grid, so the one table builder serves it too.
 * A columnar file has no lines: a cell's position is its 1-based data row and column number. Pure.
 */
import type { Grid } from './grid.js';
import { isNumberText } from './number.js';

export interface ColumnTable {
  names: string[];
  rows: number;
  /** Per column: its texts ('' where null), or its slot in `numbers`. */
  columns: (string[] | number)[];
  /** The numeric columns, row-major: row r's slot s at numbers[r * width + s]; NaN where null. */
  numbers: Float64Array;
  width: number;
  /** Set by a reader that checked every number while decoding: all in the safe range (numeric.ts), none missing. */
  inRange?: boolean;
}

export function columnsGrid(t: ColumnTable): Grid {
  const { numbers, width } = t;
  const text = (r: number, c: number) => {
    const col = t.columns[c];
    if (typeof col !== 'number') return col[r];
    const v = numbers[r * width + col];
    return Number.isNaN(v) ? '' : String(v);
  };
  const number = (r: number, c: number) => {
    const col = t.columns[c];
    if (typeof col === 'number') return numbers[r * width + col];
    return isNumberText(col[r]) ? Number(col[r]) : Number.NaN;
  };
  // The first extraction of exactly the numeric columns, in order, takes the block as it is.
  let taken = false;
  return {
    header: t.names,
    rows: t.rows,
    rowLine: lineNumbers(t.rows),
    text,
    number,
    position: (r, c) => ({ line: r + 1, col: c + 1 }),
    extract(numberCols, textCols) {
      const texts = textCols.map((c) => {
        const col = t.columns[c];
        return typeof col === 'number' ? Array.from({ length: t.rows }, (_, r) => text(r, c)) : col.slice();
      });
      const whole = !taken && numberCols.length === width && numberCols.every((c, j) => t.columns[c] === j);
      let out = numbers;
      if (whole) taken = true;
      else {
        const w = numberCols.length;
        out = new Float64Array(t.rows * w);
        for (let j = 0; j < w; j++) {
          const c = numberCols[j];
          const slot = t.columns[c];
          if (typeof slot === 'number') for (let r = 0; r < t.rows; r++) out[r * w + j] = numbers[r * width + slot];
          else for (let r = 0; r < t.rows; r++) out[r * w + j] = number(r, c);
        }
      }
      const failed: number[] = [];
      // The block as checked while decoding: nothing to scan.
      if (whole && t.inRange) return { numbers: out, failed, texts, inRange: true };
      for (let k = 0; k < out.length; k++) if (out[k] !== out[k]) failed.push(k);
      return { numbers: out, failed, texts };
    },
  };
}

function lineNumbers(rows: number): Int32Array {
  const lines = new Int32Array(rows);
  for (let r = 0; r < rows; r++) lines[r] = r + 1;
  return lines;
}
