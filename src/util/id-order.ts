import { compareUtf8 } from './bytes.js';

/** Rows 0..n-1 sorted by the UTF-8 bytes of their ids (the spec's "id order"). */
export function idOrder(ids: readonly string[]): Int32Array {
  // Ids arrays are never mutated after a table is built, so one sort per array serves every caller.
  const cached = orderCache.get(ids);
  if (cached) return cached;
  const order = new Int32Array(ids.length);
  for (let i = 0; i < ids.length; i++) order[i] = i;
  // Without surrogates (code points beyond U+FFFF), UTF-16 order is UTF-8 byte order, and the
  // engine's own string comparison gives it directly.
  if (ids.some((id) => SURROGATE.test(id))) order.sort((i, j) => compareUtf8(ids[i], ids[j]));
  else order.sort((i, j) => (ids[i] < ids[j] ? -1 : ids[i] > ids[j] ? 1 : 0));
  orderCache.set(ids, order);
  return order;
}

const SURROGATE = /[\ud800-\udfff]/;
const orderCache = new WeakMap<readonly string[], Int32Array>();
