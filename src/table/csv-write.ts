/** RFC 4180 cell quoting for the CSV files foldseal writes (LF line ends). */
export function csvCell(text: string): string {
  return /[",\r\n]/.test(text) || text !== text.trim() ? `"${text.replaceAll('"', '""')}"` : text;
}

/**
 * A number's text exactly as String(v) writes it (ECMAScript's Number::toString: the shortest
 * decimal that reads back as the same double). For a finite number JSON.stringify is that text by
 * definition (ECMA-262, SerializeJSONProperty), and V8 makes it about twice as fast, without the
 * long-lived garbage that String() leaves behind over a million conversions (measured: a
 * million-line predictions.csv grew the heap by some 100 MB that way).
 */
export function numberText(v: number): string {
  return v - v === 0 ? JSON.stringify(v) : String(v);
}

const quotedCache = new WeakMap<readonly string[], string[]>();

/** csvCell of every value; cached per array (a table's ids are written to several files, never changed). */
export function csvCells(values: readonly string[]): string[] {
  let quoted = quotedCache.get(values);
  if (!quoted) {
    quoted = values.map(csvCell);
    quotedCache.set(values, quoted);
  }
  return quoted;
}

export function csvLine(cells: readonly string[]): string {
  return cells.map(csvCell).join(',') + '\n';
}
