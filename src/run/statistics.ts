/** The statistics section of a run (intervals, permutation test) from its cross-validation. Pure. */
import type { Protocol } from '../protocol/types.js';
import type { Assignment } from '../split/assignment.js';
import { idOrder } from '../split/key.js';
import { metricIntervals, type IntervalsResult } from '../stats/intervals.js';
import type { Table } from '../table/table.js';
import type { CvResult } from './cross-validate.js';
import { permutationResult, permutedScores, type PermutationResult } from './permutation.js';

export interface RunStatistics {
  intervals: IntervalsResult;
  permutation: PermutationResult | null;
}

/** `permuted`: the permuted scores computed elsewhere (on worker threads); without them they are computed here. */
export function runStatistics(p: Protocol, table: Table, a: Assignment, cv: CvResult, permuted?: Float64Array): RunStatistics | undefined {
  const s = p.statistics;
  if (!s) return undefined;
  const intervals = metricIntervals(
    p.metrics,
    {
      classes: cv.classes,
      positive: cv.positive,
      y: table.y,
      order: idOrder(table.ids),
      oof: cv.oof,
      testedIn: cv.testedIn,
      folds: cv.folds,
    },
    { level: s.level, bootstrap: s.bootstrap },
  );
  const permutation = s.permutation
    ? permutationResult(
        p,
        cv.summary[s.permutation.metric].mean ?? Number.NaN,
        permuted ?? permutedScores(p, table, a, 1, s.permutation.count),
      )
    : null;
  return { intervals, permutation };
}

/** results.json's `statistics`. */
export function statisticsJson(s: RunStatistics): Record<string, unknown> {
  const i = s.intervals;
  return {
    version: i.version,
    level: i.level,
    bootstrap: i.replicates === null ? null : { replicates: i.replicates, seed: i.seed },
    intervals: i.metrics,
    notes: i.notes,
    permutation: s.permutation
      ? {
          metric: s.permutation.metric,
          count: s.permutation.count,
          seed: s.permutation.seed,
          within: s.permutation.within,
          observed: s.permutation.observed,
          'at-least-as-good': s.permutation.atLeastAsGood,
          'p-value': s.permutation.pValue,
          null: s.permutation.null,
          'undefined-in': s.permutation.undefinedIn,
        }
      : null,
  };
}
