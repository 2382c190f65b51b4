/**
 * split-v1 key derivation (docs/split-spec.md §2):
 *   key = SHA-256( "foldseal/split-v1" 0x00 seed 0x00 repeat 0x00 id )
 * with seed and repeat written as ASCII decimal and the id as its UTF-8 bytes.
 */
import { ShortHasher } from './sha256.js';
import { compareUtf8 } from '../util/bytes.js';
import { sortFloat64 } from '../util/sort-float64.js';

const DOMAIN = 'foldseal/split-v1';
const utf8 = new TextEncoder();

export function keyMessage(seed: number, repeat: number | string, id: string): Buffer {
  return Buffer.concat([Buffer.from(`${DOMAIN}\0${seed}\0${repeat}\0`, 'utf8'), Buffer.from(id, 'utf8')]);
}

/**
 * 32-byte keys for every id, laid end to end; or, given `into`, the keys of ids[from..to) written
 * into `out` from byte `at` on (a caller filling its share of a shared array in place).
 */
export function deriveKeys(
  ids: readonly string[],
  seed: number,
  repeat: number | string,
  into?: { out: Uint8Array; at: number; from: number; to: number },
): Uint8Array {
  return keysAfterPrefix(utf8.encode(`${DOMAIN}\0${seed}\0${repeat}\0`), ids, into);
}

/** SHA-256(prefix ‖ UTF-8(s)) for every string s, laid end to end (the split keys, and resample-v1's permutation keys); `into` as for deriveKeys. */
export function keysAfterPrefix(
  prefix: Uint8Array,
  ids: readonly string[],
  { out, at, from, to }: { out: Uint8Array; at: number; from: number; to: number } = {
    out: new Uint8Array(ids.length * 32),
    at: 0,
    from: 0,
    to: ids.length,
  },
): Uint8Array {
  const p = prefix.length;
  const hasher = new ShortHasher();
  hasher.block.set(prefix);
  for (let i = from; i < to; i++) {
    const id = ids[i];
    // An id takes at most 3 UTF-8 bytes per UTF-16 unit; ASCII ids are written byte by byte.
    hasher.reserve(p + id.length * 3);
    const block = hasher.block;
    let length = p;
    for (let c = 0; c < id.length; c++, length++) {
      const code = id.charCodeAt(c);
      if (code >= 0x80) {
        length = p + utf8.encodeInto(id, block.subarray(p)).written;
        break;
      }
      block[length] = code;
    }
    hasher.digestBlockInto(length, out, at + (i - from) * 32);
  }
  return out;
}

/** The first four key bytes as an unsigned big-endian integer (used by `assign: stable`). */
export function keyPrefix32(keys: Uint8Array, i: number): number {
  const o = i * 32;
  return ((keys[o] << 24) >>> 0) + (keys[o + 1] << 16) + (keys[o + 2] << 8) + keys[o + 3];
}

/** Compare keys i and j as 256-bit unsigned integers; equal keys fall back to id byte order. */
export function compareKeys(keys: Uint8Array, ids: readonly string[], i: number, j: number): number {
  const a = i * 32;
  const b = j * 32;
  for (let t = 0; t < 32; t++) {
    const d = keys[a + t] - keys[b + t];
    if (d !== 0) return d;
  }
  return compareUtf8(ids[i], ids[j]);
}

/** `rows` sorted by key (ascending). */
export function sortByKey(rows: Int32Array, keys: Uint8Array, ids: readonly string[]): Int32Array {
  // The first 4 key bytes and the row number packed into one double (exact below 2^53 while
  // rows < 2^21) sort as numbers; only rows sharing those 4 bytes need the full comparison.
  if (ids.length >= 2 ** 21) {
    const out = Int32Array.from(rows);
    return out.sort((i, j) => compareKeys(keys, ids, i, j));
  }
  const packed = new Float64Array(rows.length);
  for (let k = 0; k < rows.length; k++) packed[k] = keyPrefix32(keys, rows[k]) * 2 ** 21 + rows[k];
  sortFloat64(packed);
  const out = new Int32Array(rows.length);
  for (let k = 0; k < rows.length; k++) out[k] = packed[k] % 2 ** 21;
  for (let a = 0; a < out.length; ) {
    let b = a + 1;
    const prefix = Math.floor(packed[a] / 2 ** 21);
    while (b < out.length && Math.floor(packed[b] / 2 ** 21) === prefix) b++;
    if (b - a > 1) out.subarray(a, b).sort((i, j) => compareKeys(keys, ids, i, j));
    a = b;
  }
  return out;
}

export { idOrder } from '../util/id-order.js';
