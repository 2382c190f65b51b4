/** Rows and class counts per repeat and fold, plus the spread of fold sizes (for `stable` mode reports). */
import type { Assignment } from './assignment.js';

export interface FoldCount {
  repeat: number;
  fold: number;
  rows: number;
  perClass: number[];
}

export function foldCounts(a: Assignment, y: Int32Array, classCount: number): FoldCount[] {
  const n = a.ids.length;
  const out: FoldCount[] = [];
  for (let r = 1; r <= a.repeats; r++) {
    const counts = Array.from({ length: a.folds }, () => new Array<number>(classCount).fill(0));
    for (let i = 0; i < n; i++) counts[a.fold[(r - 1) * n + i] - 1][y[i]]++;
    counts.forEach((perClass, f) => {
      out.push({ repeat: r, fold: f + 1, rows: perClass.reduce((s, v) => s + v, 0), perClass });
    });
  }
  return out;
}

export function sizeSpread(counts: readonly FoldCount[]): { min: number; max: number } {
  const sizes = counts.map((c) => c.rows);
  return { min: Math.min(...sizes), max: Math.max(...sizes) };
}
