/** metric name → entry (description, direction, value). Adding a metric: its entry in a family file and one line here. */
import { brier, logLoss } from './probabilistic.js';
import { averagePrecision, rocAuc } from './ranking.js';
import { accuracy, balancedAccuracy, f1, kappa, mcc, precision, recall } from './threshold.js';
import type { Metric } from './types.js';

const entries = {
  accuracy,
  'balanced-accuracy': balancedAccuracy,
  precision,
  recall,
  f1,
  mcc,
  kappa,
  'roc-auc': rocAuc,
  'average-precision': averagePrecision,
  'log-loss': logLoss,
  brier,
};

/** The metric names: the registry's keys. */
export type MetricName = keyof typeof entries;

export const metrics: Record<MetricName, Metric> = entries;

/** The protocol schema's `metrics.items`, generated from the entries. */
export function metricItemSchema(): Record<string, unknown> {
  return {
    description: `A metric name: ${Object.entries(metrics)
      .map(([name, m]) => `${name} — ${m.description}`)
      .join(' ')}`,
    enum: Object.keys(metrics),
  };
}
