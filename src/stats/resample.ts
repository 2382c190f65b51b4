/**
 * resample-v1 (docs/resample-spec.md): bootstrap draws and label permutations from SHA-256 keys,
 * so an independent implementation draws the same replicates and permutations. Pure.
 */
import { ShortHasher } from '../split/sha256.js';
import { keysAfterPrefix, sortByKey } from '../split/key.js';

export const RESAMPLE_VERSION = 'resample-v1';
const DOMAIN = 'foldseal/resample-v1';
const utf8 = new TextEncoder();

/** Largest number of rows of one class a bootstrap draw supports (w·m stays below 2^53). */
export const MAX_CLASS_ROWS = 2 ** 21;

/**
 * Row indices of one bootstrap draw from `rows` (one class's tested rows of one repeat, in id
 * order): draw j takes word j mod 8 of SHA-256(DOMAIN 0 "bootstrap" 0 seed 0 replicate 0 repeat 0
 * label 0 floor(j/8)), a big-endian 32-bit w, and picks rows[floor(w·m / 2^32)].
 */
export class BootstrapDrawer {
  private readonly hasher = new ShortHasher();
  private readonly digest = new Uint8Array(32);

  draw(rows: Int32Array, seed: number, replicate: number, repeat: number, label: string, out: Int32Array, offset: number): void {
    const m = rows.length;
    const prefix = utf8.encode(`${DOMAIN}\0bootstrap\0${seed}\0${replicate}\0${repeat}\0${label}\0`);
    const blocks = Math.ceil(m / 8);
    for (let t = 0; t < blocks; t++) {
      const tail = utf8.encode(String(t));
      const length = prefix.length + tail.length;
      this.hasher.reserve(length);
      this.hasher.block.set(prefix);
      this.hasher.block.set(tail, prefix.length);
      this.hasher.digestBlockInto(length, this.digest, 0);
      const d = this.digest;
      for (let w = 0; w < 8 && t * 8 + w < m; w++) {
        const o = w * 4;
        const word = ((d[o] << 24) >>> 0) + (d[o + 1] << 16) + (d[o + 2] << 8) + d[o + 3];
        out[offset + t * 8 + w] = rows[Math.floor((word * m) / 4294967296)];
      }
    }
  }
}

/**
 * Labels of permutation `permutation`: within each stratum (all rows, or the rows of one group),
 * the rows in id order r₁…rₙ and the same rows in key order s₁…sₙ (ties by id bytes); s_k gets
 * the label r_k had. `order` is the table's id order; the result is indexed like y.
 */
export function permutedLabels(
  ids: readonly string[],
  y: Int32Array,
  order: Int32Array,
  seed: number,
  permutation: number,
  strata?: readonly string[],
): Int32Array {
  // Key order with ties by id bytes: the split spec's own ordering (split/key.ts).
  const keys = keysAfterPrefix(utf8.encode(`${DOMAIN}\0permute\0${seed}\0${permutation}\0`), ids);
  const out = new Int32Array(y.length);
  const groups = new Map<string, number[]>();
  for (const row of order) {
    const s = strata ? strata[row] : '';
    const list = groups.get(s);
    if (list) list.push(row);
    else groups.set(s, [row]);
  }
  for (const rows of groups.values()) {
    const byKey = sortByKey(Int32Array.from(rows), keys, ids);
    for (let k = 0; k < rows.length; k++) out[byKey[k]] = y[rows[k]];
  }
  return out;
}
