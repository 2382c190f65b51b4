/**
 * New rows that carry a label (a held-back test set): the reconciled predictions scored against
 * it with the protocol's metrics. Rows that were in the cross-validation (held-out source) and
 * rows without a label are left out and counted. Pure.
 */
import { metrics, type MetricName } from '../metric/registry.js';
import { scored } from '../metric/types.js';
import { error, type Problem } from '../problems/problem.js';
import type { AppliedRow } from './applied.js';

export interface NewRowScores {
  /** Rows scored. */
  rows: number;
  /** Rows left out: from the cross-validation (their held-out predictions are not a new test), without a label. */
  'left-out': { 'held-out': number; unlabeled: number };
  metrics: Record<string, number | null>;
}

export interface NewRowLabels {
  /** Label by id, as in the file. */
  byId: ReadonlyMap<string, string>;
  /** data.classes: label values per class, when the protocol maps them. */
  classMap?: Record<string, string[]>;
  missing: readonly string[];
}

export function scoreNewRows(
  applied: readonly AppliedRow[],
  labels: NewRowLabels,
  classes: readonly string[],
  positive: number,
  names: readonly string[],
  file: string,
): { scores?: NewRowScores; problems: Problem[] } {
  const code = new Map(classes.map((c, i) => [c, i]));
  if (labels.classMap)
    for (const [name, values] of Object.entries(labels.classMap)) for (const v of values) code.set(v, classes.indexOf(name));
  const k = classes.length;
  const truth: number[] = [];
  const proba: number[] = [];
  let heldOut = 0;
  let unlabeled = 0;
  const unknown = new Set<string>();
  for (const r of applied) {
    const label = labels.byId.get(r.id) ?? '';
    if (r.source === 'held-out') heldOut++;
    else if (label === '' || labels.missing.includes(label)) unlabeled++;
    else if (!code.has(label) || code.get(label)! < 0) unknown.add(label);
    else {
      truth.push(code.get(label)!);
      for (let c = 0; c < k; c++) proba.push(r.values[c]);
    }
  }
  if (unknown.size)
    return {
      problems: [
        error('new-rows-unknown-label', `labels of the new rows that are no class of the model: ${[...unknown].slice(0, 10).join(', ')}`, {
          file,
          hint: `the classes are ${classes.join(', ')}`,
        }),
      ],
    };
  const s = scored(Int32Array.from(truth), Float64Array.from(proba), k, positive);
  return {
    scores: {
      rows: truth.length,
      'left-out': { 'held-out': heldOut, unlabeled },
      metrics: Object.fromEntries(names.map((m) => [m, truth.length ? metrics[m as MetricName].value(s) : null])),
    },
    problems: [],
  };
}
