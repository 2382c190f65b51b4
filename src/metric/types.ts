/** What a metric sees: true class codes, probabilities (rows × k), k, and the positive class for binary metrics. */
export interface Scored {
  truth: Int32Array;
  proba: Float64Array;
  classCount: number;
  /** Positive class code (binary metrics); the last class when the protocol names none. */
  positive: number;
  /** Predicted class codes: the most probable class, the first in class order on ties. */
  predicted: Int32Array;
}

/** A metric value, or null where it is undefined for these rows (e.g. ROC AUC with one class present). */
export type MetricValue = (s: Scored) => number | null;

/** A metric's entry: what it measures (schema and docs are generated from it), which way is better, and its value. */
export interface Metric {
  /** The name a methods section and a report use ("ROC AUC"). */
  readonly title: string;
  readonly description: string;
  readonly better: 'higher' | 'lower';
  readonly value: MetricValue;
}

export function metric(title: string, better: Metric['better'], description: string, value: MetricValue): Metric {
  return { title, description, better, value };
}

export function predictedClasses(proba: Float64Array, k: number): Int32Array {
  const rows = proba.length / k;
  const out = new Int32Array(rows);
  for (let r = 0; r < rows; r++) {
    let best = 0;
    for (let c = 1; c < k; c++) if (proba[r * k + c] > proba[r * k + best]) best = c;
    out[r] = best;
  }
  return out;
}

export function scored(truth: Int32Array, proba: Float64Array, classCount: number, positive: number): Scored {
  return { truth, proba, classCount, positive, predicted: predictedClasses(proba, classCount) };
}

/** Rows `rows` of a whole table's true codes y and probabilities (table rows × k), scored in that order. */
export function scoredRows(y: Int32Array, proba: Float64Array, classCount: number, positive: number, rows: Int32Array): Scored {
  const k = classCount;
  const truth = new Int32Array(rows.length);
  const p = new Float64Array(rows.length * k);
  for (let i = 0; i < rows.length; i++) {
    truth[i] = y[rows[i]];
    for (let c = 0; c < k; c++) p[i * k + c] = proba[rows[i] * k + c];
  }
  return scored(truth, p, k, positive);
}
