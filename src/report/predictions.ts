/** predictions.csv as typed columns: the out-of-fold probabilities every plot of the report is drawn from. Pure. */
import { delimitedGrid, readDelimited } from '../table/delimited.js';

export interface OutOfFold {
  classes: string[];
  ids: string[];
  repeat: Int32Array;
  fold: Int32Array;
  /** Index of the true class, -1 when the truth is not one of the classes. */
  truth: Int32Array;
  predicted: Int32Array;
  /** rows × classes, row-major. */
  proba: Float64Array;
}

export function parsePredictions(bytes: Uint8Array, file: string): OutOfFold {
  const read = readDelimited(bytes, 44, file);
  if (!read.table) throw new Error(`${file} is not a table`);
  const g = delimitedGrid(read.table);
  const classes = g.header.slice(5).map((h) => h.replace(/^p_/, ''));
  const k = classes.length;
  const n = g.rows;
  const index = new Map(classes.map((c, i) => [c, i]));
  const out: OutOfFold = {
    classes,
    ids: Array.from({ length: n }, (_, r) => g.text(r, 0)),
    repeat: Int32Array.from({ length: n }, (_, r) => g.number(r, 1)),
    fold: Int32Array.from({ length: n }, (_, r) => g.number(r, 2)),
    truth: Int32Array.from({ length: n }, (_, r) => index.get(g.text(r, 3)) ?? -1),
    predicted: Int32Array.from({ length: n }, (_, r) => index.get(g.text(r, 4)) ?? -1),
    proba: new Float64Array(n * k),
  };
  for (let r = 0; r < n; r++) for (let c = 0; c < k; c++) out.proba[r * k + c] = g.number(r, 5 + c);
  return out;
}
