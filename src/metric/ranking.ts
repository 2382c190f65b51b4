/**
 * Metrics of the probability ranking. ROC AUC is the Mann–Whitney U statistic divided by
 * n₁·n₀ (ties count one half, via mid-ranks); average precision is Σ (R_t − R_{t−1})·P_t over
 * the distinct score thresholds in decreasing order. With more than two classes both are
 * macro averages of one-vs-rest values over the classes present in the truth.
 */
import type { Metric, Scored } from './types.js';

export function aucOf(score: Float64Array, positive: Uint8Array): number | null {
  const n = score.length;
  const order = Array.from(score.keys()).sort((a, b) => score[a] - score[b]);
  let rankSum = 0;
  let n1 = 0;
  for (let i = 0; i < n; ) {
    let j = i;
    while (j + 1 < n && score[order[j + 1]] === score[order[i]]) j++;
    const mid = (i + j) / 2 + 1;
    for (let t = i; t <= j; t++) if (positive[order[t]]) { rankSum += mid; n1++; }
    i = j + 1;
  }
  const n0 = n - n1;
  if (n1 === 0 || n0 === 0) return null;
  return (rankSum - (n1 * (n1 + 1)) / 2) / (n1 * n0);
}

export function averagePrecisionOf(score: Float64Array, positive: Uint8Array): number | null {
  const n = score.length;
  const order = Array.from(score.keys()).sort((a, b) => score[b] - score[a]);
  let total = 0;
  for (let i = 0; i < n; i++) total += positive[i];
  if (total === 0) return null;
  let tp = 0;
  let seen = 0;
  let lastRecall = 0;
  let ap = 0;
  for (let i = 0; i < n; ) {
    let j = i;
    while (j + 1 < n && score[order[j + 1]] === score[order[i]]) j++;
    for (let t = i; t <= j; t++) { tp += positive[order[t]]; seen++; }
    const r = tp / total;
    ap += (r - lastRecall) * (tp / seen);
    lastRecall = r;
    i = j + 1;
  }
  return ap;
}

function column(s: Scored, c: number): { score: Float64Array; positive: Uint8Array } {
  const rows = s.truth.length;
  const score = new Float64Array(rows);
  const positive = new Uint8Array(rows);
  for (let r = 0; r < rows; r++) { score[r] = s.proba[r * s.classCount + c]; positive[r] = s.truth[r] === c ? 1 : 0; }
  return { score, positive };
}

function oneVsRest(s: Scored, f: (score: Float64Array, positive: Uint8Array) => number | null): number | null {
  if (s.classCount === 2) { const { score, positive } = column(s, s.positive); return f(score, positive); }
  let total = 0;
  let used = 0;
  for (let c = 0; c < s.classCount; c++) {
    const { score, positive } = column(s, c);
    const v = f(score, positive);
    if (v !== null) { total += v; used++; }
  }
  return used === 0 ? null : total / used;
}

export const rocAuc: Metric = (s) => oneVsRest(s, aucOf);
export const averagePrecision: Metric = (s) => oneVsRest(s, averagePrecisionOf);
