/**
 * ROC and precision–recall curves, a reliability table and a confusion matrix from out-of-fold
 * probabilities. Curves step through the distinct scores from the highest down (tied scores move
 * together), as the ranking metrics of metric/ranking.ts count them. Pure.
 */
import type { OutOfFold } from './predictions.js';

export interface CurvePoint {
  x: number;
  y: number;
}

/** ROC (x = false-positive rate, y = true-positive rate) and PR (x = recall, y = precision) of one score. */
export function curves(score: Float64Array, positive: Uint8Array): { roc: CurvePoint[]; pr: CurvePoint[] } {
  const n = score.length;
  let p = 0;
  for (let i = 0; i < n; i++) p += positive[i];
  const neg = n - p;
  if (p === 0 || neg === 0) return { roc: [], pr: [] };
  const order = Int32Array.from({ length: n }, (_, i) => i).sort((a, b) => score[b] - score[a]);
  const roc: CurvePoint[] = [{ x: 0, y: 0 }];
  const pr: CurvePoint[] = [{ x: 0, y: 1 }];
  let tp = 0;
  let fp = 0;
  for (let i = 0; i < n; ) {
    const v = score[order[i]];
    while (i < n && score[order[i]] === v) {
      if (positive[order[i]]) tp++;
      else fp++;
      i++;
    }
    roc.push({ x: fp / neg, y: tp / p });
    pr.push({ x: tp / p, y: tp / (tp + fp) });
  }
  return { roc, pr };
}

export interface ReliabilityBin {
  /** Mean predicted probability of the rows in the bin. */
  predicted: number;
  /** Share of those rows that are of the class. */
  observed: number;
  rows: number;
}

/** Ten equal-width bins of the predicted probability of `positive` (empty bins left out). */
export function reliability(score: Float64Array, positive: Uint8Array, bins = 10): ReliabilityBin[] {
  const sum = new Float64Array(bins);
  const hits = new Float64Array(bins);
  const count = new Float64Array(bins);
  for (let i = 0; i < score.length; i++) {
    const b = Math.min(bins - 1, Math.floor(score[i] * bins));
    sum[b] += score[i];
    hits[b] += positive[i];
    count[b]++;
  }
  const out: ReliabilityBin[] = [];
  for (let b = 0; b < bins; b++) if (count[b]) out.push({ predicted: sum[b] / count[b], observed: hits[b] / count[b], rows: count[b] });
  return out;
}

/** The rows of a selection as a score for class `c` and a 0/1 truth. */
export function scoresFor(o: OutOfFold, c: number, keep: (row: number) => boolean): { score: Float64Array; positive: Uint8Array } {
  const k = o.classes.length;
  const rows: number[] = [];
  for (let r = 0; r < o.ids.length; r++) if (o.truth[r] >= 0 && keep(r)) rows.push(r);
  return {
    score: Float64Array.from(rows, (r) => o.proba[r * k + c]),
    positive: Uint8Array.from(rows, (r) => (o.truth[r] === c ? 1 : 0)),
  };
}

/** counts[truth][predicted], summed over every repeat (each row counts once per repeat). */
export function confusion(o: OutOfFold): number[][] {
  const k = o.classes.length;
  const m = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  for (let r = 0; r < o.ids.length; r++) if (o.truth[r] >= 0 && o.predicted[r] >= 0) m[o.truth[r]][o.predicted[r]]++;
  return m;
}
