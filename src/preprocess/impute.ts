/** Fill missing cells (NaN) with the training mean or median of the column's present values. */
import { TransformError, type TransformImpl } from './types.js';

export interface ImputeParams { fill: number[] }

export const impute: TransformImpl<ImputeParams> = {
  fit(X, _y, _k, step: { by: 'mean' | 'median' }) {
    const { rows, cols, data } = X;
    const fill: number[] = [];
    for (let j = 0; j < cols; j++) {
      const present: number[] = [];
      for (let r = 0; r < rows; r++) { const v = data[r * cols + j]; if (v === v) present.push(v); }
      if (present.length === 0) throw new TransformError('impute-empty-column', `feature ${j + 1} has no present value in a training part, so there is nothing to impute from`);
      if (step.by === 'mean') fill.push(present.reduce((a, b) => a + b, 0) / present.length);
      else {
        present.sort((a, b) => a - b);
        const h = present.length >> 1;
        fill.push(present.length % 2 ? present[h] : (present[h - 1] + present[h]) / 2);
      }
    }
    return { fill };
  },
  restrict(p, positions) {
    return { fill: positions.map((j) => p.fill[j]) };
  },
  apply(p, X) {
    const out = Float64Array.from(X.data);
    for (let k = 0; k < out.length; k++) if (out[k] !== out[k]) out[k] = p.fill[k % X.cols];
    return { rows: X.rows, cols: X.cols, data: out };
  },
};
