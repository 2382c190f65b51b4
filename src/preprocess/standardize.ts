/** Subtract the training mean, divide by the training standard deviation (divisor n); constant columns are only centred. */
import { overallMoments } from '../model/class-moments.js';
import { keepsWidth, type TransformImpl } from './types.js';

export interface StandardizeParams {
  mean: number[];
  scale: number[];
}

export const standardize: TransformImpl<StandardizeParams, Record<string, never>> = {
  description: 'subtract the training mean, divide by the training standard deviation (n divisor); constant columns are only centred.',
  methods: () => 'each feature was centred and scaled by the mean and standard deviation of the training part',
  settings: {},
  fillsMissing: false,
  check: keepsWidth,
  fit(X) {
    const { rows, cols, data } = X;
    const mean = new Float64Array(cols);
    for (let r = 0; r < rows; r++) for (let j = 0; j < cols; j++) mean[j] += data[r * cols + j];
    for (let j = 0; j < cols; j++) mean[j] /= rows;
    const ss = new Float64Array(cols);
    for (let r = 0; r < rows; r++)
      for (let j = 0; j < cols; j++) {
        const d = data[r * cols + j] - mean[j];
        ss[j] += d * d;
      }
    const scale = Array.from(ss, (s) => {
      const sd = Math.sqrt(s / rows);
      return sd > 0 ? sd : 1;
    });
    return { mean: Array.from(mean), scale };
  },
  fast: {
    kind: 'column-wise',
    column: {
      fields: ['mean', 'scale'],
      fit(v, n, _step, out) {
        let sum = 0;
        for (let i = 0; i < n; i++) sum += v[i];
        const mean = sum / n;
        let ss = 0;
        for (let i = 0; i < n; i++) {
          const d = v[i] - mean;
          ss += d * d;
        }
        const sd = Math.sqrt(ss / n);
        out[0] = mean;
        out[1] = sd > 0 ? sd : 1;
      },
      apply(v, n, p) {
        const mean = p[0];
        const scale = p[1];
        for (let i = 0; i < n; i++) v[i] = (v[i] - mean) / scale;
      },
    },
    moments: {
      fit(m) {
        const { rows, mean, ss } = overallMoments(m);
        return {
          mean: Array.from(mean),
          scale: Array.from(ss, (s) => {
            const sd = Math.sqrt(s / rows);
            return sd > 0 ? sd : 1;
          }),
        };
      },
      // z = (x − mean) / scale moves every class mean the same way and scales spreads by 1/scale².
      after(p, m) {
        const { classCount, cols } = m;
        const mean = new Float64Array(classCount * cols);
        const m2 = new Float64Array(classCount * cols);
        for (let c = 0; c < classCount; c++) {
          for (let j = 0; j < cols; j++) {
            const k = c * cols + j;
            mean[k] = m.n[c] > 0 ? (m.mean[k] - p.mean[j]) / p.scale[j] : 0;
            m2[k] = m.m2[k] / (p.scale[j] * p.scale[j]);
          }
        }
        return { classCount, cols, n: m.n, mean, m2 };
      },
    },
  },
  apply(p, X, owned) {
    const { rows, cols, data } = X;
    const out = owned ? data : new Float64Array(rows * cols);
    const mean = Float64Array.from(p.mean);
    const scale = Float64Array.from(p.scale);
    for (let r = 0; r < rows; r++) for (let j = 0; j < cols; j++) out[r * cols + j] = (data[r * cols + j] - mean[j]) / scale[j];
    return { rows, cols, data: out };
  },
  applyRows(p, X, rows, out) {
    const { cols, data } = X;
    const mean = Float64Array.from(p.mean);
    const scale = Float64Array.from(p.scale);
    for (let i = 0; i < rows.length; i++) {
      const from = rows[i] * cols;
      const to = i * cols;
      for (let j = 0; j < cols; j++) out[to + j] = (data[from + j] - mean[j]) / scale[j];
    }
    return { rows: rows.length, cols, data: out };
  },
};
