/**
 * Scores of the probabilities themselves.
 * log-loss: mean −ln p(true class), probabilities clipped to [ε, 1 − ε] with ε = 2⁻⁵² and each
 * row renormalized (common practice; it keeps a zero probability finite instead of infinite).
 * brier: with two classes, mean (p_positive − 1[positive])²; with more, the mean over rows of
 * Σ_k (p_k − 1[k])² (Brier 1950).
 */
import { metric } from './types.js';

const EPS = 2 ** -52;

export const logLoss = metric(
  'log-loss',
  'lower',
  'mean −ln p(true class), probabilities clipped to [2⁻⁵², 1 − 2⁻⁵²] and renormalized.',
  (s) => {
    const k = s.classCount;
    const rows = s.truth.length;
    let total = 0;
    for (let r = 0; r < rows; r++) {
      let sum = 0;
      for (let c = 0; c < k; c++) sum += Math.min(Math.max(s.proba[r * k + c], EPS), 1 - EPS);
      const p = Math.min(Math.max(s.proba[r * k + s.truth[r]], EPS), 1 - EPS) / sum;
      total -= Math.log(p);
    }
    return total / rows;
  },
);

export const brier = metric(
  'Brier score',
  'lower',
  'mean squared difference between the probabilities and the 0/1 truth (of the positive class with two classes).',
  (s) => {
    const k = s.classCount;
    const rows = s.truth.length;
    let total = 0;
    for (let r = 0; r < rows; r++) {
      if (k === 2) {
        const d = s.proba[r * k + s.positive] - (s.truth[r] === s.positive ? 1 : 0);
        total += d * d;
        continue;
      }
      for (let c = 0; c < k; c++) {
        const d = s.proba[r * k + c] - (s.truth[r] === c ? 1 : 0);
        total += d * d;
      }
    }
    return total / rows;
  },
);
