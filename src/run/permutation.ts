/**
 * The permutation test of Ojala & Garriga (2010, JMLR 11:1833, test 1) under resample-v1
 * (docs/resample-spec.md §6): labels permuted by the spec's rule, the protocol's folds kept, the
 * whole in-fold pipeline refitted for every permutation. Pure.
 */
import { metrics } from '../metric/registry.js';
import type { Protocol } from '../protocol/types.js';
import type { Assignment } from '../split/assignment.js';
import { idOrder } from '../split/key.js';
import { permutedLabels } from '../stats/resample.js';
import type { Table } from '../table/table.js';
import { crossValidate } from './cross-validate.js';

export interface PermutationResult {
  version: string;
  metric: string;
  count: number;
  seed: number;
  within: 'all' | 'group';
  observed: number;
  /** Permutations scoring at least as well as the data. */
  atLeastAsGood: number;
  pValue: number;
  /** Quantiles of the permuted scores (the null distribution). */
  null: { min: number; q05: number; q25: number; median: number; q75: number; q95: number; max: number; mean: number };
  /** Permutations where the metric was undefined in every fold (counted as not as good). */
  undefinedIn: number;
}

/** The permuted scores of permutations from..to (1-based, inclusive): what a worker or a shard computes. */
export function permutedScores(p: Protocol, table: Table, a: Assignment, from: number, to: number): Float64Array {
  const spec = p.statistics!.permutation!;
  const order = idOrder(table.ids);
  const only: Protocol = { ...p, metrics: [spec.metric], statistics: undefined };
  const out = new Float64Array(to - from + 1);
  for (let perm = from; perm <= to; perm++) {
    const y = permutedLabels(table.ids, table.y, order, spec.seed, perm, spec.within === 'group' ? table.groups : undefined);
    const cv = crossValidate(only, { ...table, y }, a);
    out[perm - from] = cv.summary[spec.metric].mean ?? Number.NaN;
  }
  return out;
}

/** Quantile by linear interpolation between order statistics (common practice; scipy's and R's default type 7). */
function quantile(sorted: Float64Array, q: number): number {
  const h = (sorted.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/** The test's result from the observed score and every permuted score (NaN where undefined). */
export function permutationResult(p: Protocol, observed: number, scores: Float64Array): PermutationResult {
  const spec = p.statistics!.permutation!;
  const higher = metrics[spec.metric].better === 'higher';
  let good = 0;
  let undefinedIn = 0;
  const defined: number[] = [];
  for (const s of scores) {
    if (Number.isNaN(s)) {
      undefinedIn++;
      continue;
    }
    defined.push(s);
    if (higher ? s >= observed : s <= observed) good++;
  }
  const sorted = Float64Array.from(defined).sort();
  const q = (x: number) => (sorted.length ? quantile(sorted, x) : Number.NaN);
  return {
    version: 'resample-v1',
    metric: spec.metric,
    count: spec.count,
    seed: spec.seed,
    within: spec.within,
    observed,
    atLeastAsGood: good,
    pValue: (1 + good) / (1 + scores.length),
    null: {
      min: q(0),
      q05: q(0.05),
      q25: q(0.25),
      median: q(0.5),
      q75: q(0.75),
      q95: q(0.95),
      max: q(1),
      mean: defined.reduce((x, y) => x + y, 0) / defined.length,
    },
    undefinedIn,
  };
}
