/** Row indices of each class, classes in code order (= UTF-8 byte order of the labels). */
export function rowsByClass(y: Int32Array, classCount: number): Int32Array[] {
  const counts = new Int32Array(classCount);
  for (let i = 0; i < y.length; i++) counts[y[i]]++;
  const out = Array.from(counts, (c) => new Int32Array(c));
  const fill = new Int32Array(classCount);
  for (let i = 0; i < y.length; i++) out[y[i]][fill[y[i]]++] = i;
  return out;
}

/** Distinct group values in UTF-8 byte order, and each row's group index. */
export function groupIndex(groups: readonly string[], compare: (a: string, b: string) => number): { names: string[]; of: Int32Array } {
  const names = [...new Set(groups)].sort(compare);
  const index = new Map(names.map((g, i) => [g, i]));
  const of = new Int32Array(groups.length);
  for (let i = 0; i < groups.length; i++) of[i] = index.get(groups[i])!;
  return { names, of };
}
