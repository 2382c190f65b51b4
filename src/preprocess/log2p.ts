/** log2(x + 1), for counts and intensities; negative input is rejected rather than turned into NaN. */
import { FitError } from '../problems/problem.js';
import { keepsWidth, type TransformImpl } from './types.js';

export const log2p: TransformImpl<Record<string, never>, Record<string, never>> = {
  description: 'log2(x + 1), for counts and intensities; a negative value is an error, not NaN.',
  methods: () => 'values were transformed as log2(x + 1)',
  settings: {},
  fillsMissing: false,
  check: keepsWidth,
  fit() {
    return {};
  },
  fast: {
    kind: 'column-wise',
    column: {
      fields: [],
      fit() {},
      apply(v, n) {
        for (let i = 0; i < n; i++) {
          // The position is not known here; the whole-matrix apply re-raises this with it.
          if (v[i] < 0) throw new FitError('log2p-negative', `log2p got the negative value ${v[i]}`);
          v[i] = Math.log2(v[i] + 1);
        }
      },
    },
  },
  apply(_p, X, owned) {
    const out = owned ? X.data : new Float64Array(X.data.length);
    for (let k = 0; k < out.length; k++) {
      const v = X.data[k];
      if (v < 0)
        throw new FitError(
          'log2p-negative',
          `log2p got the negative value ${v} (feature ${(k % X.cols) + 1}, row ${Math.floor(k / X.cols) + 1} of the part)`,
          'log2p is for non-negative data such as counts; put it before standardize',
        );
      out[k] = Math.log2(v + 1);
    }
    return { rows: X.rows, cols: X.cols, data: out };
  },
};
