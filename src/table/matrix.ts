/** Row-major dense matrix: cell (r, c) is data[r * cols + c]. */
export interface Matrix {
  rows: number;
  cols: number;
  data: Float64Array;
}

export function matrix(rows: number, cols: number, data = new Float64Array(rows * cols)): Matrix {
  return { rows, cols, data };
}

/** The rows listed in `index`, in that order; written into `out` when given (its length index.length × cols). */
export function takeRows(m: Matrix, index: Int32Array, out: Float64Array = new Float64Array(index.length * m.cols)): Matrix {
  const cols = m.cols;
  const data = m.data;
  if (cols < 256) {
    // Short rows: a plain loop beats allocating a subarray view per row.
    let o = 0;
    for (let i = 0; i < index.length; i++) {
      const from = index[i] * cols;
      for (let j = 0; j < cols; j++) out[o++] = data[from + j];
    }
  } else {
    for (let i = 0; i < index.length; i++) {
      const from = index[i] * cols;
      out.set(data.subarray(from, from + cols), i * cols);
    }
  }
  return { rows: index.length, cols, data: out };
}

/** The columns listed in `index`, in that order. */
export function takeCols(m: Matrix, index: Int32Array): Matrix {
  const k = index.length;
  const out = new Float64Array(m.rows * k);
  for (let r = 0; r < m.rows; r++) {
    const base = r * m.cols;
    for (let j = 0; j < k; j++) out[r * k + j] = m.data[base + index[j]];
  }
  return { rows: m.rows, cols: k, data: out };
}

/** Cells at the listed rows and columns: out(i, j) = m(rows[i], cols[j]). */
export function takeCells(
  m: Matrix,
  rows: Int32Array,
  cols: Int32Array,
  out: Float64Array = new Float64Array(rows.length * cols.length),
): Matrix {
  const k = cols.length;
  const data = m.data;
  for (let i = 0; i < rows.length; i++) {
    const base = rows[i] * m.cols;
    const o = i * k;
    for (let j = 0; j < k; j++) out[o + j] = data[base + cols[j]];
  }
  return { rows: rows.length, cols: k, data: out };
}

export function takeInt(values: Int32Array, index: Int32Array): Int32Array {
  const out = new Int32Array(index.length);
  for (let i = 0; i < index.length; i++) out[i] = values[index[i]];
  return out;
}
