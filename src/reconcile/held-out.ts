/**
 * Held-out values of rows that were in the cross-validation: the probabilities each received
 * while held out, averaged over repeats (in repeat order), and the top class of each repeat.
 */
import { predictedClasses } from '../metric/types.js';
import { readDelimited, textColumn } from '../table/delimited.js';
import { parseNumberBytes } from '../table/number.js';

export interface HeldOut {
  mean: Float64Array;
  tops: number[];
}

/** From the runner's out-of-fold arrays (rows never tested are skipped). */
export function heldOutFromOof(
  ids: readonly string[],
  oof: readonly Float64Array[],
  testedIn: readonly Int32Array[],
  k: number,
): Map<string, HeldOut> {
  const out = new Map<string, HeldOut>();
  ids.forEach((id, row) => {
    const sum = new Float64Array(k);
    const tops: number[] = [];
    oof.forEach((p, r) => {
      if (testedIn[r][row] === 0) return;
      const v = p.subarray(row * k, (row + 1) * k);
      for (let c = 0; c < k; c++) sum[c] += v[c];
      tops.push(predictedClasses(v, k)[0]);
    });
    if (tops.length) out.set(id, { mean: sum.map((s) => s / tops.length), tops });
  });
  return out;
}

/** From predictions.csv (its numbers round-trip exactly, so this equals heldOutFromOof). */
export function heldOutFromPredictions(text: Uint8Array, classes: readonly string[]): Map<string, HeldOut> {
  const t = readDelimited(text, 0x2c, 'predictions.csv').table!;
  const k = classes.length;
  const ids = textColumn(t, 0);
  const byId = new Map<string, Float64Array[]>();
  for (let r = 0; r < t.rows; r++) {
    const v = new Float64Array(k);
    for (let c = 0; c < k; c++) {
      const cell = r * t.cols + 5 + c;
      v[c] = parseNumberBytes(t.bytes, t.starts[cell], t.ends[cell]);
    }
    const list = byId.get(ids[r]) ?? [];
    list.push(v);
    byId.set(ids[r], list);
  }
  const out = new Map<string, HeldOut>();
  for (const [id, list] of byId) {
    const sum = new Float64Array(k);
    for (const v of list) for (let c = 0; c < k; c++) sum[c] += v[c];
    out.set(id, { mean: sum.map((s) => s / list.length), tops: list.map((v) => predictedClasses(v, k)[0]) });
  }
  return out;
}
