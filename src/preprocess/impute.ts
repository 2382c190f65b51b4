/** Fill missing cells (NaN) with the training mean or median of the column's present values. */
import { FitError } from '../problems/problem.js';
import { keepsWidth, type TransformImpl } from './types.js';

export interface ImputeParams {
  fill: number[];
}
export interface ImputeStep {
  by: 'mean' | 'median';
}

function fillValue(present: number[], step: ImputeStep, column: number): number {
  if (present.length === 0)
    throw new FitError(
      'impute-empty-column',
      `feature ${column + 1} has no present value in a training part, so there is nothing to impute from`,
    );
  if (step.by === 'mean') return present.reduce((a, b) => a + b, 0) / present.length;
  present.sort((a, b) => a - b);
  const h = present.length >> 1;
  return present.length % 2 ? present[h] : (present[h - 1] + present[h]) / 2;
}

export const impute: TransformImpl<ImputeParams, ImputeStep> = {
  description: 'replace missing cells by a statistic of the column in the training part.',
  methods: (s) => `missing values were filled with the training part's ${s.by} of the feature`,
  settings: { by: { description: 'Statistic of the training part used to fill missing cells.', enum: ['mean', 'median'] } },
  fillsMissing: true,
  check: keepsWidth,
  fit(X, _y, _k, step) {
    const { rows, cols, data } = X;
    const fill: number[] = [];
    for (let j = 0; j < cols; j++) {
      const present: number[] = [];
      for (let r = 0; r < rows; r++) {
        const v = data[r * cols + j];
        if (v === v) present.push(v);
      }
      fill.push(fillValue(present, step, j));
    }
    return { fill };
  },
  fast: {
    kind: 'column-wise',
    column: {
      fields: ['fill'],
      fit(v, n, step, out) {
        const present: number[] = [];
        for (let i = 0; i < n; i++) if (v[i] === v[i]) present.push(v[i]);
        // The column's position is not known here; a failure is re-raised by the whole-matrix fit, which names it.
        out[0] = fillValue(present, step, -1);
      },
      apply(v, n, p) {
        for (let i = 0; i < n; i++) if (v[i] !== v[i]) v[i] = p[0];
      },
    },
  },
  apply(p, X, owned) {
    const out = owned ? X.data : Float64Array.from(X.data);
    for (let k = 0; k < out.length; k++) if (out[k] !== out[k]) out[k] = p.fill[k % X.cols];
    return { rows: X.rows, cols: X.cols, data: out };
  },
};
