/**
 * A paired comparison of two cross-validations of the same data on the same folds (B against A):
 * per metric the corrected resampled t-test of the per-fold differences, McNemar's exact test of
 * the predicted classes and DeLong's paired test of ROC AUC per repeat, and a verdict that says no
 * more than the tests do. Pure: sides in, result or problems out.
 */
import { metrics, type MetricName } from '../metric/registry.js';
import { error, warning, type Problem } from '../problems/problem.js';
import { correctedTTest, type Interval } from '../stats/corrected-t.js';
import { delongPaired, placements } from '../stats/delong.js';
import { mcnemarExact } from '../stats/mcnemar.js';
import type { ComparedSide } from './side.js';

export const COMPARE_VERSION = 1;

export interface MetricComparison {
  metric: string;
  better: 'higher' | 'lower';
  /** Means over the folds where both sides have a value. */
  a: number;
  b: number;
  /** Mean of the per-fold differences B − A. */
  difference: number;
  folds: number;
  /** Folds left out because the metric is undefined there on either side. */
  'undefined-folds': number;
  se: number;
  t: number | null;
  df: number;
  p: number | null;
  interval: Interval;
}

export interface McNemarRepeat {
  repeat: number;
  rows: number;
  'only-a-right': number;
  'only-b-right': number;
  'both-right': number;
  'both-wrong': number;
  p: number;
}

export interface DeLongRepeat {
  repeat: number;
  'auc-a': number;
  'auc-b': number;
  /** AUC of B − AUC of A. */
  difference: number;
  se: number;
  z: number;
  p: number;
}

export interface Comparison {
  'foldseal-compare': number;
  a: { source: string; name: string; 'protocol-sha256': string };
  b: { source: string; name: string; 'protocol-sha256': string };
  'data-sha256': string;
  'assignment-sha256': string;
  level: number;
  metrics: MetricComparison[];
  mcnemar: McNemarRepeat[];
  /** Null with more than two classes (DeLong's test is for a binary ROC AUC). */
  delong: DeLongRepeat[] | null;
  verdict: { metric: string; text: string };
  notes: string[];
}

/** Why the two sides cannot be compared as pairs (errors), or what to keep in mind (warnings). */
export function pairingProblems(a: ComparedSide, b: ComparedSide): Problem[] {
  const out: Problem[] = [];
  const hint = 'a paired comparison needs both protocols to name the same data file and the same split (rule, seed, folds, repeats)';
  if (a.dataSha256 !== b.dataSha256)
    out.push(
      error(
        'compare-different-data',
        `A and B used different data (sha256 ${a.dataSha256.slice(0, 12)}… and ${b.dataSha256.slice(0, 12)}…)`,
        { hint },
      ),
    );
  else if (a.assignmentSha256 !== b.assignmentSha256)
    out.push(
      error(
        'compare-different-folds',
        `A and B tested the rows in different folds (assignment sha256 ${a.assignmentSha256.slice(0, 12)}… and ${b.assignmentSha256.slice(0, 12)}…)`,
        { hint },
      ),
    );
  if (a.classes.join('\u0000') !== b.classes.join('\u0000') || a.positive !== b.positive)
    out.push(
      error(
        'compare-different-classes',
        `A and B have different classes or positive class (${a.classes.join(', ')} / ${b.classes.join(', ')})`,
      ),
    );
  if (!out.length && a.protocolSha256 === b.protocolSha256)
    out.push(warning('compare-same-protocol', 'A and B are the same protocol: every difference is 0'));
  return out;
}

export interface CompareSettings {
  level: number;
  /** The metric the verdict is about (default: the first metric both report). */
  metric?: string;
}

/** The paired comparison; call only when pairingProblems has no errors. */
export function compareSides(a: ComparedSide, b: ComparedSide, s: CompareSettings): Comparison {
  const notes: string[] = [];
  const shared = a.metrics.filter((m) => b.metrics.includes(m));
  const onlyOne = [...a.metrics, ...b.metrics].filter((m) => !shared.includes(m));
  if (onlyOne.length) notes.push(`compared only the metrics both report; left out ${[...new Set(onlyOne)].join(', ')}`);
  const bFold = new Map(b.folds.map((f) => [`${f.repeat}/${f.fold}`, f]));
  const testRows = a.folds.reduce((x, f) => x + f.testRows, 0) / a.folds.length;
  const trainRows = a.folds.reduce((x, f) => x + f.trainRows, 0) / a.folds.length;
  const compared: MetricComparison[] = [];
  for (const m of shared) {
    const da: number[] = [];
    const db: number[] = [];
    let missing = 0;
    for (const f of a.folds) {
      const va = f.metrics[m];
      const vb = bFold.get(`${f.repeat}/${f.fold}`)?.metrics[m] ?? null;
      if (va === null || vb === null) missing++;
      else {
        da.push(va);
        db.push(vb);
      }
    }
    const diffs = db.map((v, i) => v - da[i]);
    const test = correctedTTest(diffs, testRows, trainRows, s.level);
    const mean = (v: number[]) => v.reduce((x, y) => x + y, 0) / v.length;
    if (!test) {
      notes.push(`${m}: fewer than two folds with a value on both sides; no test`);
      continue;
    }
    compared.push({
      metric: m,
      better: metrics[m as MetricName].better,
      a: mean(da),
      b: mean(db),
      difference: test.mean,
      folds: diffs.length,
      'undefined-folds': missing,
      se: test.se,
      t: Number.isNaN(test.t) ? null : test.t,
      df: test.df,
      p: test.p,
      interval: test.interval,
    });
  }
  const { mcnemar, delong } = perRepeat(a, b);
  if (delong === null) notes.push("DeLong's test compares two-class ROC AUCs; with more classes it is left out");
  if (a.repeats > 1)
    notes.push(
      "McNemar's and DeLong's tests are given per repeat: the repeats test the same rows again, so their results are not independent and are not combined",
    );
  if (compared.length > 1)
    notes.push('each metric is tested on its own; with several metrics, one small p-value is expected by chance more often');
  const primary = s.metric ?? compared[0]?.metric;
  return {
    'foldseal-compare': COMPARE_VERSION,
    a: { source: a.source, name: a.name, 'protocol-sha256': a.protocolSha256 },
    b: { source: b.source, name: b.name, 'protocol-sha256': b.protocolSha256 },
    'data-sha256': a.dataSha256,
    'assignment-sha256': a.assignmentSha256,
    level: s.level,
    metrics: compared,
    mcnemar,
    delong,
    verdict: {
      metric: primary ?? '',
      text: verdict(
        compared.find((c) => c.metric === primary),
        a,
        b,
        s.level,
      ),
    },
    notes,
  };
}

function perRepeat(a: ComparedSide, b: ComparedSide): { mcnemar: McNemarRepeat[]; delong: DeLongRepeat[] | null } {
  const pa = a.predictions;
  const pb = b.predictions;
  const rowOfB = new Map<string, number>();
  for (let i = 0; i < pb.ids.length; i++) rowOfB.set(`${pb.repeat[i]}\u0000${pb.ids[i]}`, i);
  const binary = a.classes.length === 2;
  const positive = a.classes.indexOf(a.positive);
  const mcnemar: McNemarRepeat[] = [];
  const delong: DeLongRepeat[] = [];
  const repeats = [...new Set(pa.repeat)].sort((x, y) => x - y);
  for (const r of repeats) {
    const counts = { rows: 0, onlyA: 0, onlyB: 0, both: 0, neither: 0 };
    const scores: [number[], number[], number[], number[]] = [[], [], [], []]; // A pos, A neg, B pos, B neg
    for (let i = 0; i < pa.ids.length; i++) {
      if (pa.repeat[i] !== r) continue;
      const j = rowOfB.get(`${r}\u0000${pa.ids[i]}`);
      if (j === undefined) continue;
      const rightA = pa.predicted[i] === pa.truth[i];
      const rightB = pb.predicted[j] === pa.truth[i];
      counts.rows++;
      if (rightA && rightB) counts.both++;
      else if (rightA) counts.onlyA++;
      else if (rightB) counts.onlyB++;
      else counts.neither++;
      const pos = pa.truth[i] === positive ? 0 : 1;
      scores[pos].push(pa.positive[i]);
      scores[pos + 2].push(pb.positive[j]);
    }
    mcnemar.push({
      repeat: r,
      rows: counts.rows,
      'only-a-right': counts.onlyA,
      'only-b-right': counts.onlyB,
      'both-right': counts.both,
      'both-wrong': counts.neither,
      p: mcnemarExact(counts.onlyA, counts.onlyB),
    });
    if (!binary) continue;
    const placeA = placements(Float64Array.from(scores[0]), Float64Array.from(scores[1]));
    const placeB = placements(Float64Array.from(scores[2]), Float64Array.from(scores[3]));
    const test = delongPaired(placeB, placeA);
    if (test)
      delong.push({ repeat: r, 'auc-a': placeA.auc, 'auc-b': placeB.auc, difference: test.difference, se: test.se, z: test.z, p: test.p });
  }
  return { mcnemar, delong: binary ? delong : null };
}

const num = (v: number) => v.toFixed(4);
const pText = (p: number) => (p < 0.001 ? p.toExponential(1) : p.toPrecision(2));

function verdict(c: MetricComparison | undefined, a: ComparedSide, b: ComparedSide, level: number): string {
  if (!c) return 'no metric could be compared';
  const alpha = Math.round((1 - level) * 1e6) / 1e4;
  const ci = `${Math.round(level * 1e6) / 1e4} % interval of B − A ${num(c.interval[0])} to ${num(c.interval[1])}`;
  if (c.p === null)
    return `${c.metric}: B − A is ${num(c.difference)} in every one of ${c.folds} folds; with no spread across folds the t-test says nothing`;
  const evidence = `(corrected resampled t-test over ${c.folds} folds, p = ${pText(c.p)}; ${ci})`;
  if (c.p >= 1 - level)
    return `${c.metric}: no evidence of a difference between A and B at the ${alpha} % level ${evidence}; this does not show that they perform the same`;
  const bBetter = c.better === 'higher' ? c.difference > 0 : c.difference < 0;
  const [winner, loser] = bBetter ? [`B (${b.name})`, `A (${a.name})`] : [`A (${a.name})`, `B (${b.name})`];
  return `${c.metric}: ${winner} scored better than ${loser} on these data and folds, by ${num(Math.abs(c.difference))} ${evidence}`;
}
