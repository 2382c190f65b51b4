/**
 * Snappy decompression (the raw block format of Google's snappy "format_description.txt": a
 * varint length, then literals and back-references with 1-, 2- or 4-byte offsets), used for
 * Parquet pages, into `out`, which must be exactly the declared size. Long literals and
 * non-overlapping copies move as blocks. Pure.
 */
export function unsnappy(input: Uint8Array, out: Uint8Array): Uint8Array {
  const size = out.length;
  const end = input.length;
  let pos = 0;
  let declared = 0;
  for (let shift = 0; ; shift += 7) {
    if (pos >= end || shift > 28) throw new Error('snappy: a broken length header');
    const b = input[pos++];
    declared += (b & 0x7f) * 2 ** shift;
    if (b < 0x80) break;
  }
  if (declared !== size) throw new Error(`snappy: the block holds ${declared} bytes, the page header says ${size}`);
  let at = 0;
  while (pos < end) {
    const tag = input[pos++];
    const kind = tag & 3;
    if (kind === 0) {
      let length = (tag >>> 2) + 1;
      if (length > 60) {
        const bytes = length - 60;
        if (pos + bytes > end) throw new Error('snappy: input ends inside a literal length');
        length = input[pos];
        if (bytes > 1) length |= input[pos + 1] << 8;
        if (bytes > 2) length |= input[pos + 2] << 16;
        if (bytes > 3) length = (length | (input[pos + 3] << 24)) >>> 0;
        length += 1;
        pos += bytes;
      }
      if (pos + length > end || at + length > size) throw new Error('snappy: a literal runs past the end');
      if (length < 16) for (let i = 0; i < length; i++) out[at + i] = input[pos + i];
      else out.set(input.subarray(pos, pos + length), at);
      pos += length;
      at += length;
      continue;
    }
    let length: number;
    let offset: number;
    if (kind === 1) {
      if (pos >= end) throw new Error('snappy: input ends inside a copy');
      length = ((tag >>> 2) & 7) + 4;
      offset = ((tag >>> 5) << 8) | input[pos++];
    } else {
      const bytes = kind === 2 ? 2 : 4;
      if (pos + bytes > end) throw new Error('snappy: input ends inside a copy');
      length = (tag >>> 2) + 1;
      offset = input[pos] | (input[pos + 1] << 8);
      if (kind === 3) offset = (offset | (input[pos + 2] << 16) | (input[pos + 3] << 24)) >>> 0;
      pos += bytes;
    }
    if (offset === 0 || offset > at || at + length > size) throw new Error('snappy: a copy points outside the output');
    if (offset >= length && length >= 16) out.copyWithin(at, at - offset, at - offset + length);
    else for (let i = 0; i < length; i++) out[at + i] = out[at - offset + i];
    at += length;
  }
  if (at !== size) throw new Error(`snappy: the block ends after ${at} of ${size} bytes`);
  return out;
}
