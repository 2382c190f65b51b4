/**
 * An unsigned LEB128 varint of at most 32 bits (Parquet's run headers, snappy's length) at
 * `at.pos` in bytes[..end), moving `at.pos` past it; a varint cut short or longer than five bytes
 * throws `broken`. Pure.
 */
export function uleb128(bytes: Uint8Array, at: { pos: number }, end: number, broken: string): number {
  let value = 0;
  for (let shift = 0; ; shift += 7) {
    if (at.pos >= end || shift > 28) throw new Error(broken);
    const b = bytes[at.pos++];
    value += (b & 0x7f) * 2 ** shift;
    if (b < 0x80) return value;
  }
}
