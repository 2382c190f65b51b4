/**
 * The corrected resampled t statistic of Nadeau & Bengio (2003, Machine Learning 52:239), in the
 * form Bouckaert & Frank (2004, PAKDD) give for r × k-fold cross-validation: the variance of the
 * mean of J = r·k fold values is taken as (1/J + n_test/n_train)·s² instead of s²/J, because the
 * folds' training parts overlap and every row is tested once per repeat, so the fold values are
 * correlated. Used for the interval of one protocol's mean and for the paired difference of two. Pure.
 */
import { tCdf, tQuantile } from './special.js';

export type Interval = [number, number];

function meanAndVariance(values: readonly number[]): { mean: number; s2: number } {
  const j = values.length;
  const mean = values.reduce((a, b) => a + b, 0) / j;
  return { mean, s2: values.reduce((a, v) => a + (v - mean) * (v - mean), 0) / (j - 1) };
}

/** Corrected resampled t interval of the mean of fold values, and the naive one (df = J − 1). */
export function correctedT(
  values: readonly number[],
  testRows: number,
  trainRows: number,
  level: number,
): { mean: number; corrected: Interval; naive: Interval; df: number } | null {
  const j = values.length;
  if (j < 2) return null;
  const { mean, s2 } = meanAndVariance(values);
  const t = tQuantile(1 - (1 - level) / 2, j - 1);
  const corrected = t * Math.sqrt((1 / j + testRows / trainRows) * s2);
  const naive = t * Math.sqrt(s2 / j);
  return { mean, corrected: [mean - corrected, mean + corrected], naive: [mean - naive, mean + naive], df: j - 1 };
}

export interface CorrectedTTest {
  /** Mean of the values (for a paired comparison: of the per-fold differences). */
  mean: number;
  /** Corrected standard error sqrt((1/J + n_test/n_train)·s²). */
  se: number;
  t: number;
  df: number;
  /** Two-sided p-value of mean = 0; null when every value is the same (s² = 0), where the test says nothing. */
  p: number | null;
  interval: Interval;
}

/** Corrected resampled t-test of mean = 0 (two-sided) with its interval at `level`. */
export function correctedTTest(values: readonly number[], testRows: number, trainRows: number, level: number): CorrectedTTest | null {
  const j = values.length;
  if (j < 2) return null;
  const { mean, s2 } = meanAndVariance(values);
  const se = Math.sqrt((1 / j + testRows / trainRows) * s2);
  const half = tQuantile(1 - (1 - level) / 2, j - 1) * se;
  if (!(se > 0)) return { mean, se: 0, t: Number.NaN, df: j - 1, p: null, interval: [mean, mean] };
  const t = mean / se;
  return { mean, se, t, df: j - 1, p: Math.min(1, 2 * tCdf(-Math.abs(t), j - 1)), interval: [mean - half, mean + half] };
}
