/**
 * Metrics of the probability ranking. ROC AUC is the Mann–Whitney U statistic divided by
 * n₁·n₀ (ties count one half, via mid-ranks); average precision is Σ (R_t − R_{t−1})·P_t over
 * the distinct score thresholds in decreasing order. With more than two classes both are
 * macro averages of one-vs-rest values over the classes present in the truth.
 */
import { metric, type Scored } from './types.js';
import { sortFloat64 } from '../util/sort-float64.js';

/** Scores of the positive and the negative rows, each sorted ascending (in the native typed-array order). */
function sortedByClass(score: Float64Array, positive: Uint8Array): { pos: Float64Array; neg: Float64Array } {
  let n1 = 0;
  for (let i = 0; i < positive.length; i++) n1 += positive[i];
  const pos = new Float64Array(n1);
  const neg = new Float64Array(score.length - n1);
  let a = 0;
  let b = 0;
  for (let i = 0; i < score.length; i++) {
    if (positive[i]) pos[a++] = score[i];
    else neg[b++] = score[i];
  }
  return { pos: sortFloat64(pos), neg: sortFloat64(neg) };
}

export function aucOf(score: Float64Array, positive: Uint8Array): number | null {
  const { pos, neg } = sortedByClass(score, positive);
  const n1 = pos.length;
  const n0 = neg.length;
  if (n1 === 0 || n0 === 0) return null;
  // U = Σ over positives of (negatives below + ½ negatives tied): the mid-rank sum minus n₁(n₁+1)/2.
  // Every partial sum is a multiple of ½ below 2^53, so it is exact and equals the rank-sum form.
  let u = 0;
  let below = 0;
  let tiedEnd = 0;
  for (let i = 0; i < n1; i++) {
    const v = pos[i];
    while (below < n0 && neg[below] < v) below++;
    if (tiedEnd < below) tiedEnd = below;
    while (tiedEnd < n0 && neg[tiedEnd] === v) tiedEnd++;
    u += below + (tiedEnd - below) / 2;
  }
  return u / (n1 * n0);
}

export function averagePrecisionOf(score: Float64Array, positive: Uint8Array): number | null {
  const { pos, neg } = sortedByClass(score, positive);
  const total = pos.length;
  if (total === 0) return null;
  // Distinct thresholds from the highest score down; each adds its tied rows at once.
  let i = pos.length - 1;
  let j = neg.length - 1;
  let tp = 0;
  let seen = 0;
  let lastRecall = 0;
  let ap = 0;
  while (i >= 0) {
    const v = j >= 0 && neg[j] > pos[i] ? neg[j] : pos[i];
    while (i >= 0 && pos[i] === v) {
      tp++;
      seen++;
      i--;
    }
    while (j >= 0 && neg[j] === v) {
      seen++;
      j--;
    }
    const r = tp / total;
    ap += (r - lastRecall) * (tp / seen);
    lastRecall = r;
  }
  return ap;
}

function column(s: Scored, c: number): { score: Float64Array; positive: Uint8Array } {
  const rows = s.truth.length;
  const score = new Float64Array(rows);
  const positive = new Uint8Array(rows);
  for (let r = 0; r < rows; r++) {
    score[r] = s.proba[r * s.classCount + c];
    positive[r] = s.truth[r] === c ? 1 : 0;
  }
  return { score, positive };
}

function oneVsRest(s: Scored, f: (score: Float64Array, positive: Uint8Array) => number | null): number | null {
  if (s.classCount === 2) {
    const { score, positive } = column(s, s.positive);
    return f(score, positive);
  }
  let total = 0;
  let used = 0;
  for (let c = 0; c < s.classCount; c++) {
    const { score, positive } = column(s, c);
    const v = f(score, positive);
    if (v !== null) {
      total += v;
      used++;
    }
  }
  return used === 0 ? null : total / used;
}

export const rocAuc = metric(
  'ROC AUC',
  'higher',
  'area under the ROC curve of the positive class probability (Mann–Whitney U / n₁n₀, ties one half); macro one-vs-rest with more classes.',
  (s) => oneVsRest(s, aucOf),
);
export const averagePrecision = metric(
  'average precision',
  'higher',
  'area under the precision–recall steps, Σ (Rₜ − Rₜ₋₁)·Pₜ over distinct thresholds; macro one-vs-rest with more classes.',
  (s) => oneVsRest(s, averagePrecisionOf),
);
