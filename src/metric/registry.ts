/** metric name → function. Adding a metric: one function in a family file and one line here (and the schema enum). */
import type { MetricName } from '../protocol/types.js';
import { brier, logLoss } from './probabilistic.js';
import { averagePrecision, rocAuc } from './ranking.js';
import { accuracy, balancedAccuracy, f1, kappa, mcc, precision, recall } from './threshold.js';
import type { Metric } from './types.js';

export const metrics: Record<MetricName, Metric> = {
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
