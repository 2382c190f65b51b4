/** Compare two strings by their UTF-8 bytes (the order the split spec uses everywhere). */
export function compareUtf8(a: string, b: string): number {
  if (a === b) return 0;
  // For strings without surrogate pairs, UTF-16 code unit order equals code point order,
  // which equals UTF-8 byte order. Surrogates (U+10000 and up) need the slow path.
  const n = Math.min(a.length, b.length);
  for (let i = 0; i < n; i++) {
    const x = a.charCodeAt(i);
    const y = b.charCodeAt(i);
    if (x !== y) {
      const xs = x >= 0xd800 && x <= 0xdfff;
      const ys = y >= 0xd800 && y <= 0xdfff;
      if (xs === ys) return x < y ? -1 : 1;
      // A surrogate (astral code point) sorts after every BMP code point in UTF-8.
      return xs ? 1 : -1;
    }
  }
  return a.length - b.length;
}
