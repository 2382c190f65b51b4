/**
 * Confidence intervals of a cross-validation's metrics (docs/resample-spec.md §3–§5):
 * - pooled metrics: stratified bootstrap of the out-of-fold predictions (percentile and BCa);
 * - ROC AUC with two classes: DeLong's interval;
 * - means over folds: the corrected resampled t interval (Nadeau & Bengio 2003; Bouckaert &
 *   Frank 2004 for repeated k-fold), next to the naive t interval it corrects. Pure.
 */
import type { MetricName } from '../metric/registry.js';
import { metrics } from '../metric/registry.js';
import { scoredRows } from '../metric/types.js';
import { placements, delongInterval } from './delong.js';
import { BootstrapDrawer, MAX_CLASS_ROWS } from './resample.js';
import { correctedT, type Interval } from './corrected-t.js';
import { normalCdf, normalQuantile } from './special.js';

export type { Interval };

/** What the intervals are computed from: the cross-validation's out-of-fold predictions and fold results. */
export interface IntervalData {
  classes: readonly string[];
  positive: number;
  y: Int32Array;
  /** Rows in the split spec's id order. */
  order: Int32Array;
  /** Out-of-fold probabilities per repeat (rows × classes). */
  oof: readonly Float64Array[];
  /** Fold each row was tested in per repeat (0: not tested). */
  testedIn: readonly Int32Array[];
  folds: readonly { metrics: Record<string, number | null>; trainRows: number; testRows: number }[];
}

export interface IntervalSettings {
  level: number;
  bootstrap?: { replicates: number; seed: number };
}

export interface MetricIntervals {
  pooled: {
    value: number | null;
    percentile: Interval | null;
    bca: Interval | null;
    delong: Interval | null;
  };
  folds: {
    mean: number | null;
    corrected: Interval | null;
    naive: Interval | null;
    df: number | null;
  };
}

export interface IntervalsResult {
  level: number;
  version: string;
  replicates: number | null;
  seed: number | null;
  metrics: Record<string, MetricIntervals>;
  notes: string[];
}

/** Largest number of tested rows for which the BCa acceleration (a jackknife over rows) is computed. */
export const BCA_MAX_ROWS = 3000;

/** Tested rows of each repeat, split by class, each list in id order. */
function testedByClass(d: IntervalData): Int32Array[][] {
  const k = d.classes.length;
  return d.testedIn.map((tested) => {
    const lists: number[][] = Array.from({ length: k }, () => []);
    for (const row of d.order) if (tested[row] > 0) lists[d.y[row]].push(row);
    return lists.map((l) => Int32Array.from(l));
  });
}

/** Mean over repeats of the metric on the given rows of each repeat (null when any repeat's value is undefined). */
function pooledValue(name: MetricName, d: IntervalData, rowsByRepeat: readonly Int32Array[]): number | null {
  const k = d.classes.length;
  let total = 0;
  for (let r = 0; r < rowsByRepeat.length; r++) {
    const v = metrics[name].value(scoredRows(d.y, d.oof[r], k, d.positive, rowsByRepeat[r]));
    if (v === null) return null;
    total += v;
  }
  return total / rowsByRepeat.length;
}

/** 1-based order-statistic positions of a two-sided percentile interval of B sorted replicates, in exact integer arithmetic. */
export function percentilePositions(replicates: number, level: number): [number, number] {
  const l = Math.round(level * 1e6);
  const lo = Math.floor(((replicates + 1) * (1e6 - l)) / 2e6);
  const hi = Math.ceil(((replicates + 1) * (1e6 + l)) / 2e6);
  return [Math.min(Math.max(lo, 1), replicates), Math.min(Math.max(hi, 1), replicates)];
}

/** BCa interval (Efron 1987) from sorted replicates, the estimate, and the jackknife values; null where undefined. */
export function bcaInterval(sorted: Float64Array, estimate: number, jackknife: Float64Array | null, level: number): Interval | null {
  if (!jackknife) return null;
  const b = sorted.length;
  let below = 0;
  let equal = 0;
  for (const v of sorted) {
    if (v < estimate) below++;
    else if (v === estimate) equal++;
  }
  const share = (below + equal / 2) / b;
  if (share <= 0 || share >= 1) return null;
  const z0 = normalQuantile(share);
  let mean = 0;
  for (const v of jackknife) mean += v;
  mean /= jackknife.length;
  let num = 0;
  let den = 0;
  for (const v of jackknife) {
    const d = mean - v;
    num += d * d * d;
    den += d * d;
  }
  const a = den > 0 ? num / (6 * den ** 1.5) : 0;
  const adjusted = (z: number) => normalCdf(z0 + (z0 + z) / (1 - a * (z0 + z)));
  const alpha = (1 - level) / 2;
  const a1 = adjusted(normalQuantile(alpha));
  const a2 = adjusted(normalQuantile(1 - alpha));
  const lo = Math.min(Math.max(Math.floor((b + 1) * a1), 1), b);
  const hi = Math.min(Math.max(Math.ceil((b + 1) * a2), 1), b);
  return [sorted[lo - 1], sorted[hi - 1]];
}

export function metricIntervals(names: readonly MetricName[], d: IntervalData, s: IntervalSettings): IntervalsResult {
  const notes: string[] = [];
  const byClass = testedByClass(d);
  // Each repeat's tested rows in id order (the order the cross-validation pools them in).
  const testedRows = d.testedIn.map((tested) => d.order.filter((row) => tested[row] > 0));
  const out: Record<string, MetricIntervals> = {};
  for (const name of names) {
    out[name] = {
      pooled: { value: pooledValue(name, d, testedRows), percentile: null, bca: null, delong: null },
      folds: { mean: null, corrected: null, naive: null, df: null },
    };
  }
  // Corrected resampled t over the fold values.
  const meanTest = d.folds.reduce((a, f) => a + f.testRows, 0) / d.folds.length;
  const meanTrain = d.folds.reduce((a, f) => a + f.trainRows, 0) / d.folds.length;
  for (const name of names) {
    const values = d.folds.map((f) => f.metrics[name]).filter((v): v is number => v !== null);
    const t = correctedT(values, meanTest, meanTrain, s.level);
    if (t) out[name].folds = { mean: t.mean, corrected: t.corrected, naive: t.naive, df: t.df };
  }
  // DeLong for ROC AUC with two classes.
  if (names.includes('roc-auc')) {
    if (d.classes.length === 2) out['roc-auc'].pooled.delong = delongOverRepeats(d, byClass, s.level);
    else notes.push("DeLong's interval is defined for two classes; with more, ROC AUC has only the bootstrap intervals.");
  }
  if (s.bootstrap) bootstrapInto(out, names, d, byClass, testedRows, s, notes);
  return {
    level: s.level,
    version: 'resample-v1',
    replicates: s.bootstrap?.replicates ?? null,
    seed: s.bootstrap?.seed ?? null,
    metrics: out,
    notes,
  };
}

/** DeLong per repeat; with R repeats the centre is the mean AUC and SE² the mean of the repeats' variances. */
function delongOverRepeats(d: IntervalData, byClass: Int32Array[][], level: number): Interval | null {
  const c = d.positive;
  const k = d.classes.length;
  let centre = 0;
  let variance = 0;
  for (let r = 0; r < byClass.length; r++) {
    const score = (rows: Int32Array) => Float64Array.from(rows, (row) => d.oof[r][row * k + c]);
    const pos = byClass[r][c];
    const neg = byClass[r][1 - c];
    const p = placements(score(pos), score(neg));
    const one = delongInterval(p, level);
    if (!one) return null;
    centre += p.auc;
    variance += one.se * one.se;
  }
  centre /= byClass.length;
  const se = Math.sqrt(variance / byClass.length);
  const z = normalQuantile(1 - (1 - level) / 2);
  return [Math.max(0, centre - z * se), Math.min(1, centre + z * se)];
}

function bootstrapInto(
  out: Record<string, MetricIntervals>,
  names: readonly MetricName[],
  d: IntervalData,
  byClass: Int32Array[][],
  testedRows: Int32Array[],
  s: IntervalSettings,
  notes: string[],
): void {
  const { replicates, seed } = s.bootstrap!;
  if (byClass.some((lists) => lists.some((l) => l.length > MAX_CLASS_ROWS))) {
    notes.push(`the bootstrap supports at most ${MAX_CLASS_ROWS} tested rows per class; no bootstrap intervals`);
    return;
  }
  const drawer = new BootstrapDrawer();
  const values = names.map(() => new Float64Array(replicates));
  const undefinedIn = names.map(() => 0);
  const drawn = testedRows.map((rows) => new Int32Array(rows.length));
  for (let b = 1; b <= replicates; b++) {
    byClass.forEach((lists, r) => {
      let offset = 0;
      lists.forEach((rows, c) => {
        drawer.draw(rows, seed, b, r + 1, d.classes[c], drawn[r], offset);
        offset += rows.length;
      });
    });
    names.forEach((name, m) => {
      const v = pooledValue(name, d, drawn);
      if (v === null) undefinedIn[m]++;
      values[m][b - 1] = v ?? Number.NaN;
    });
  }
  const union = d.order.filter((row) => d.testedIn.some((t) => t[row] > 0));
  const bca = union.length <= BCA_MAX_ROWS;
  if (!bca) notes.push(`BCa needs a jackknife over every tested row; it is computed up to ${BCA_MAX_ROWS} tested rows`);
  const [lo, hi] = percentilePositions(replicates, s.level);
  names.forEach((name, m) => {
    if (undefinedIn[m] > 0 || out[name].pooled.value === null) {
      notes.push(`${name} is undefined in ${undefinedIn[m]} bootstrap replicates; no bootstrap interval for it`);
      return;
    }
    const sorted = values[m].sort();
    out[name].pooled.percentile = [sorted[lo - 1], sorted[hi - 1]];
    out[name].pooled.bca = bcaInterval(sorted, out[name].pooled.value!, bca ? jackknife(name, d, testedRows, union) : null, s.level);
  });
}

/** The pooled value with each tested row left out in turn (from every repeat that tests it). */
function jackknife(name: MetricName, d: IntervalData, testedRows: Int32Array[], rows: Int32Array): Float64Array | null {
  const out = new Float64Array(rows.length);
  for (let i = 0; i < rows.length; i++) {
    const without = testedRows.map((t) => t.filter((row) => row !== rows[i]));
    const v = pooledValue(name, d, without);
    if (v === null) return null;
    out[i] = v;
  }
  return out;
}
