/** Confusion matrix, row = true class, column = predicted class (k × k, row-major). */
import type { Scored } from './types.js';

export function confusion(s: Scored): Float64Array {
  const k = s.classCount;
  const m = new Float64Array(k * k);
  for (let i = 0; i < s.truth.length; i++) m[s.truth[i] * k + s.predicted[i]]++;
  return m;
}

export function confusionRows(s: Scored): number[][] {
  const m = confusion(s);
  const k = s.classCount;
  return Array.from({ length: k }, (_, r) => Array.from(m.subarray(r * k, (r + 1) * k)));
}
