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

/**
 * Builds a long text line by line into bytes. Lines gather in a short string that is copied
 * into the byte buffer every 64 K characters: keeping 100,000 lines alive until a final join
 * would make the garbage collector copy them again and again, and one buffer write per line
 * costs more than the line itself.
 */
export class TextBuilder {
  private bytes: Buffer;
  private length = 0;
  private pending = '';

  constructor(capacity = 1 << 20) {
    this.bytes = Buffer.allocUnsafe(capacity);
  }

  add(text: string): void {
    this.pending += text;
    if (this.pending.length >= 1 << 16) this.flush();
  }

  /** Bytes so far: those copied into the buffer and the characters still gathered (one byte each in ASCII). */
  get size(): number {
    return this.length + this.pending.length;
  }

  /**
   * Room for about `bytes` in all, in one allocation: a text whose length is known roughly
   * ahead then grows once instead of doubling (each fresh buffer is slow to touch).
   */
  reserve(bytes: number): void {
    if (bytes <= this.bytes.length) return;
    const grown = Buffer.allocUnsafe(bytes);
    this.bytes.copy(grown, 0, 0, this.length);
    this.bytes = grown;
  }

  text(): string {
    this.flush();
    return this.bytes.toString('utf8', 0, this.length);
  }

  /** The text's UTF-8 bytes, without a copy (a view of the buffer; add nothing after). */
  utf8(): Uint8Array {
    this.flush();
    return this.bytes.subarray(0, this.length);
  }

  /** The bytes so far, as a view of the buffer; the builder then starts over in the same buffer (the view is valid until the next add). */
  drain(): Uint8Array {
    const bytes = this.utf8();
    this.length = 0;
    return bytes;
  }

  private flush(): void {
    const text = this.pending;
    this.pending = '';
    // A UTF-16 unit never takes more than 3 UTF-8 bytes.
    if (this.length + text.length * 3 > this.bytes.length) {
      const grown = Buffer.allocUnsafe(Math.max(this.bytes.length * 2, this.length + text.length * 3));
      this.bytes.copy(grown, 0, 0, this.length);
      this.bytes = grown;
    }
    this.length += this.bytes.write(text, this.length, 'utf8');
  }
}
