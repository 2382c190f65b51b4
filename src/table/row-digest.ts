/**
 * Content digests of rows, so a row is recognized by what it holds, not only by its id. Pure.
 * Both read the feature values in feature-name order (UTF-8 byte order) as IEEE 754 doubles,
 * 8 bytes little-endian each (−0 as 0, every NaN — a missing value — as the one quiet NaN
 * 0x7ff8000000000000). The id is never part of a digest.
 * - sealed rows (`rowDigests`): SHA-256 over the label's UTF-8 bytes, a 0 byte, then the values
 *   (a security property: a copy under a new id must not slip through);
 * - known rows of a run (`featureDigests`): a fast 64-bit hash of the values (two 32-bit
 *   multiply–xor lanes), as 16 hex digits — a guard against mistakes (a new sample given a
 *   training id), not against someone forging a collision.
 */
import { createHash } from 'node:crypto';
import { compareUtf8 } from '../util/bytes.js';
import type { Matrix } from './matrix.js';
import type { Table } from './table.js';

function nameOrder(names: readonly string[]): number[] {
  return names.map((_, j) => j).sort((a, b) => compareUtf8(names[a], names[b]));
}

/** The row's values in name order, canonical NaN and zero, into `out` (a Float64Array view over bytes). */
function canonicalRow(X: Matrix, r: number, order: readonly number[], out: Float64Array): void {
  const o = r * X.cols;
  for (let k = 0; k < order.length; k++) {
    const v = X.data[o + order[k]];
    out[k] = Number.isNaN(v) ? NaN : v === 0 ? 0 : v;
  }
}

export function rowDigests(table: Table, rows?: readonly number[]): string[] {
  const order = nameOrder(table.featureNames);
  const values = new Float64Array(order.length);
  const bytes = new Uint8Array(values.buffer);
  const out: string[] = [];
  for (const r of rows ?? Array.from({ length: table.X.rows }, (_, i) => i)) {
    canonicalRow(table.X, r, order, values);
    out.push(
      createHash('sha256')
        .update(table.labels[r])
        .update(new Uint8Array([0]))
        .update(bytes)
        .digest('hex'),
    );
  }
  return out;
}

/**
 * A table's hashes of every row, made once: models.json's known rows and the audit's duplicate
 * search both use them. Keyed by the numbers themselves, which a table never changes.
 */
const everyRow = new WeakMap<Float64Array, { names: readonly string[]; hashes: Uint32Array }>();

/** The 64-bit hash of each row (or of rows[i] only, in that order): two 32-bit words per row, h1 then h2. */
export function featureHashes(X: Matrix, names: readonly string[], rows?: readonly number[]): Uint32Array {
  if (!rows) {
    const known = everyRow.get(X.data);
    if (known && known.names.length === names.length && known.names.every((n, j) => n === names[j])) return known.hashes;
  }
  const order = Int32Array.from(nameOrder(names));
  const m = order.length;
  const { data, cols } = X;
  // The values' bits, read in place: the low word of each double, then the high word (as a Float64Array's words lie).
  const bits = new Uint32Array(data.buffer, data.byteOffset, data.length * 2);
  const count = rows ? rows.length : X.rows;
  const out = new Uint32Array(count * 2);
  for (let k = 0; k < count; k++) {
    const o = (rows ? rows[k] : k) * cols;
    let h1 = 0x811c9dc5 ^ m;
    let h2 = 0x9747b28c;
    for (let j = 0; j < m; j++) {
      const idx = o + order[j];
      const v = data[idx];
      // −0 as 0, every NaN as the one quiet NaN.
      let lo = 0;
      let hi = 0;
      if (v !== v) hi = 0x7ff80000;
      else if (v !== 0) {
        lo = bits[2 * idx];
        hi = bits[2 * idx + 1];
      }
      h1 = Math.imul(h1 ^ lo, 0x01000193);
      h2 = Math.imul(h2 ^ lo, 0x5bd1e995);
      h2 ^= h2 >>> 15;
      h1 = Math.imul(h1 ^ hi, 0x01000193);
      h2 = Math.imul(h2 ^ hi, 0x5bd1e995);
      h2 ^= h2 >>> 15;
    }
    h1 = Math.imul(h1 ^ (h1 >>> 16), 0x85ebca6b);
    h2 = Math.imul(h2 ^ (h2 >>> 13), 0xc2b2ae35);
    out[2 * k] = h1 >>> 0;
    out[2 * k + 1] = (h2 ^ (h2 >>> 16)) >>> 0;
  }
  if (!rows) everyRow.set(X.data, { names: [...names], hashes: out });
  return out;
}

/** The digest of each row (or of rows[i] only, in that order): its hash as 16 hex digits. */
export function featureDigests(X: Matrix, names: readonly string[], rows?: readonly number[]): string[] {
  const hashes = featureHashes(X, names, rows);
  const digest = Buffer.alloc(8);
  const out: string[] = new Array(hashes.length / 2);
  for (let k = 0; k < out.length; k++) {
    // Buffer's hex is several times faster than toString(16) and padding.
    digest.writeUInt32BE(hashes[2 * k], 0);
    digest.writeUInt32BE(hashes[2 * k + 1], 4);
    out[k] = digest.toString('hex');
  }
  return out;
}
