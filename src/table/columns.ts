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
  /** Per column: numbers, or texts ('' where null). */
  columns: (Float64Array | string[])[];
}

export function columnsGrid(t: ColumnTable): Grid {
  const text = (r: number, c: number) => {
    const col = t.columns[c];
    if (col instanceof Float64Array) return Number.isNaN(col[r]) ? '' : String(col[r]);
    return col[r];
  };
  const number = (r: number, c: number) => {
    const col = t.columns[c];
    if (col instanceof Float64Array) return col[r];
    return isNumberText(col[r]) ? Number(col[r]) : Number.NaN;
  };
  return {
    header: t.names,
    rows: t.rows,
    rowLine: Int32Array.from({ length: t.rows }, (_, r) => r + 1),
    text,
    number,
    position: (r, c) => ({ line: r + 1, col: c + 1 }),
    extract(numberCols, textCols) {
      const width = numberCols.length;
      const numbers = new Float64Array(t.rows * width);
      const failed: number[] = [];
      // Row-major, row by row: each row's cells are written together.
      const sources = numberCols.map((c) => t.columns[c]);
      const parsed = sources.map((col, j) =>
        col instanceof Float64Array ? col : Float64Array.from({ length: t.rows }, (_, r) => number(r, numberCols[j])),
      );
      for (let r = 0, k = 0; r < t.rows; r++) {
        for (let j = 0; j < width; j++, k++) {
          const v = parsed[j][r];
          numbers[k] = v;
          if (v !== v) failed.push(k);
        }
      }
      return { numbers, failed, texts: textCols.map((c) => Array.from({ length: t.rows }, (_, r) => text(r, c))) };
    },
  };
}
