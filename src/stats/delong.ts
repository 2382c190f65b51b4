/**
 * DeLong, DeLong & Clarke-Pearson (1988): the variance of one ROC AUC, and the covariance of two
 * AUCs on the same rows, from the placement values; computed with mid-ranks as in Sun & Xu
 * (2014, IEEE Signal Processing Letters 21:1389), O(n log n). Pure.
 */
import { normalQuantile, normalUpper } from './special.js';

/** Mid-ranks (1-based, ties share their average rank) of v. */
function midRanks(v: Float64Array): Float64Array {
  const order = Array.from(v.keys()).sort((a, b) => v[a] - v[b]);
  const out = new Float64Array(v.length);
  let i = 0;
  while (i < order.length) {
    let j = i;
    while (j + 1 < order.length && v[order[j + 1]] === v[order[i]]) j++;
    const rank = (i + j) / 2 + 1;
    for (let t = i; t <= j; t++) out[order[t]] = rank;
    i = j + 1;
  }
  return out;
}

/** Placement values of one score: v10[i] for each positive, v01[j] for each negative, and the AUC. */
export interface Placements {
  auc: number;
  v10: Float64Array;
  v01: Float64Array;
}

/** `score` of the positives (pos) and negatives (neg). */
export function placements(pos: Float64Array, neg: Float64Array): Placements {
  const m = pos.length;
  const n = neg.length;
  const all = new Float64Array(m + n);
  all.set(pos);
  all.set(neg, m);
  const tz = midRanks(all);
  const tx = midRanks(pos);
  const ty = midRanks(neg);
  const v10 = new Float64Array(m);
  const v01 = new Float64Array(n);
  let sum = 0;
  for (let i = 0; i < m; i++) {
    v10[i] = (tz[i] - tx[i]) / n;
    sum += v10[i];
  }
  for (let j = 0; j < n; j++) v01[j] = 1 - (tz[m + j] - ty[j]) / m;
  return { auc: sum / m, v10, v01 };
}

function covariance(a: Float64Array, b: Float64Array): number {
  let ma = 0;
  let mb = 0;
  for (let i = 0; i < a.length; i++) {
    ma += a[i];
    mb += b[i];
  }
  ma /= a.length;
  mb /= b.length;
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i] - ma) * (b[i] - mb);
  return s / (a.length - 1);
}

/** DeLong's covariance of two AUCs on the same positives and negatives (the variance when both are one). */
export function delongCovariance(a: Placements, b: Placements): number {
  return covariance(a.v10, b.v10) / a.v10.length + covariance(a.v01, b.v01) / a.v01.length;
}

/** DeLong's interval for one AUC at the given level: AUC ± z·SE, clipped to [0, 1] (as pROC reports it). */
export function delongInterval(p: Placements, level: number): { se: number; interval: [number, number] } | null {
  if (p.v10.length < 2 || p.v01.length < 2) return null;
  const se = Math.sqrt(delongCovariance(p, p));
  const z = normalQuantile(1 - (1 - level) / 2);
  return { se, interval: [Math.max(0, p.auc - z * se), Math.min(1, p.auc + z * se)] };
}

/** DeLong's paired test of two AUCs on the same rows: z and its two-sided p-value. */
export function delongPaired(a: Placements, b: Placements): { difference: number; se: number; z: number; p: number } | null {
  if (a.v10.length < 2 || a.v01.length < 2) return null;
  const variance = delongCovariance(a, a) + delongCovariance(b, b) - 2 * delongCovariance(a, b);
  const difference = a.auc - b.auc;
  if (!(variance > 0)) return { difference, se: 0, z: difference === 0 ? 0 : Infinity, p: difference === 0 ? 1 : 0 };
  const se = Math.sqrt(variance);
  const z = difference / se;
  return { difference, se, z, p: Math.min(1, 2 * normalUpper(Math.abs(z))) };
}
