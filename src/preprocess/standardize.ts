/** Subtract the training mean, divide by the training standard deviation (divisor n); constant columns are only centred. */
import type { TransformImpl } from './types.js';

export interface StandardizeParams { mean: number[]; scale: number[] }

export const standardize: TransformImpl<StandardizeParams> = {
  fit(X) {
    const { rows, cols, data } = X;
    const mean = new Float64Array(cols);
    for (let r = 0; r < rows; r++) for (let j = 0; j < cols; j++) mean[j] += data[r * cols + j];
    for (let j = 0; j < cols; j++) mean[j] /= rows;
    const ss = new Float64Array(cols);
    for (let r = 0; r < rows; r++) for (let j = 0; j < cols; j++) { const d = data[r * cols + j] - mean[j]; ss[j] += d * d; }
    const scale = Array.from(ss, (s) => { const sd = Math.sqrt(s / rows); return sd > 0 ? sd : 1; });
    return { mean: Array.from(mean), scale };
  },
  restrict(p, positions) {
    return { mean: positions.map((j) => p.mean[j]), scale: positions.map((j) => p.scale[j]) };
  },
  apply(p, X) {
    const { rows, cols, data } = X;
    const out = new Float64Array(rows * cols);
    const mean = Float64Array.from(p.mean);
    const scale = Float64Array.from(p.scale);
    for (let r = 0; r < rows; r++) for (let j = 0; j < cols; j++) out[r * cols + j] = (data[r * cols + j] - mean[j]) / scale[j];
    return { rows, cols, data: out };
  },
};
