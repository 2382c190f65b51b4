/**
 * The selection-bias demonstration (Ambroise & McLachlan 2002): the score a careless analysis
 * would report — preprocessing and feature selection fitted once on all rows, then only the model
 * cross-validated — beside the honest score with everything fitted inside the folds, on the same
 * folds. The difference is the optimism that selecting outside the folds buys. Pure.
 */
import { fitPipeline } from '../preprocess/pipeline.js';
import { selectionOf } from '../preprocess/capability.js';
import { transforms } from '../preprocess/registry.js';
import type { MetricName } from '../metric/registry.js';
import { crossValidate } from '../run/cross-validate.js';
import type { AuditInput } from './input.js';
import { valuesOf } from '../protocol/grid.js';

export interface ScoreOf {
  /** Mean over folds (and repeats), as a run reports it. */
  mean: number | null;
  /** Over all out-of-fold predictions of each repeat, averaged over repeats. */
  pooled: number | null;
}

export interface SelectionBias {
  metric: MetricName;
  /** Everything fitted inside the folds: what foldseal reports. */
  honest: ScoreOf;
  /** Preprocessing and selection fitted once on all rows, the model cross-validated on the same folds. */
  careless: ScoreOf;
  /** Features the selection kept when fitted on all rows. */
  selectedOnAll: number;
  /** A tuned protocol's settings for the demonstration: each at its first listed value, untuned on both sides. */
  fixedAt?: Record<string, number | string>;
}

/** The metric the demonstration compares: ROC AUC when the protocol reports it, else its first metric. */
export function comparedMetric(metrics: readonly MetricName[]): MetricName {
  return metrics.includes('roc-auc') ? 'roc-auc' : metrics[0];
}

/** Undefined when the protocol's pipeline selects no features (there is no selection to move outside). */
export function selectionBias(input: Pick<AuditInput, 'protocol' | 'table' | 'assignment'>): SelectionBias | undefined {
  const { protocol: tuned, table, assignment } = input;
  // Tuning would add its own layer; the demonstration isolates selection, so tuned settings stay at their first value.
  const p = { ...tuned, grid: [], tune: undefined };
  // A command model's program runs only in the shell, with consent: the audit never runs it.
  if (p.model.kind === 'command' || !p.preprocess.some((s) => selectionOf(transforms[s.step]))) return undefined;
  const metric = comparedMetric(p.metrics);
  const scored = { ...p, metrics: [metric] };
  const honest = crossValidate(scored, table, assignment).summary[metric];
  const onAll = fitPipeline(p.preprocess, table.X, table.y, table.classes.length, table.featureNames);
  const reduced = { ...table, X: onAll.X, featureNames: onAll.pipeline.columns, hasMissing: false };
  const careless = crossValidate({ ...scored, preprocess: [] }, reduced, assignment).summary[metric];
  return {
    metric,
    honest: { mean: honest.mean, pooled: honest.pooled },
    careless: { mean: careless.mean, pooled: careless.pooled },
    selectedOnAll: onAll.pipeline.columns.length,
    ...(tuned.grid.length ? { fixedAt: valuesOf(tuned.grid, new Int32Array(tuned.grid.length)) } : {}),
  };
}
