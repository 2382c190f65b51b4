/** Mean and sample SD (n − 1) of per-fold values; null-valued folds are left out and counted. */
export interface MetricSummary {
  mean: number | null;
  sd: number | null;
  /** The metric over all out-of-fold predictions of each repeat, averaged over repeats. */
  pooled: number | null;
  /** Folds where the metric was undefined (e.g. ROC AUC on a one-class test part). */
  undefinedFolds: number;
}

export function meanSd(values: readonly (number | null)[]): { mean: number | null; sd: number | null; undefinedFolds: number } {
  const v = values.filter((x): x is number => x !== null);
  const undefinedFolds = values.length - v.length;
  if (v.length === 0) return { mean: null, sd: null, undefinedFolds };
  let s = 0;
  for (const x of v) s += x;
  const mean = s / v.length;
  if (v.length < 2) return { mean, sd: null, undefinedFolds };
  let q = 0;
  for (const x of v) q += (x - mean) * (x - mean);
  return { mean, sd: Math.sqrt(q / (v.length - 1)), undefinedFolds };
}

export function meanOf(values: readonly (number | null)[]): number | null {
  const v = values.filter((x): x is number => x !== null);
  return v.length ? v.reduce((a, b) => a + b, 0) / v.length : null;
}
