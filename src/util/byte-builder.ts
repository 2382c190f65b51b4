/**
 * UTF-8 bytes built piece by piece into one growing buffer, for outputs with a line or a member
 * per row (a million-row assignment, known rows): short ASCII texts and small integers are
 * written byte by byte, with no string made per row.
 */
export class ByteBuilder {
  private bytes: Buffer;
  private at = 0;

  constructor(capacity = 1 << 16) {
    this.bytes = Buffer.allocUnsafe(Math.max(capacity, 16));
  }

  get length(): number {
    return this.at;
  }

  /** Room for `more` bytes after the current end (the buffer at least doubles when it grows). */
  private room(more: number): void {
    if (this.at + more <= this.bytes.length) return;
    const grown = Buffer.allocUnsafe(Math.max(this.bytes.length * 2, this.at + more));
    this.bytes.copy(grown, 0, 0, this.at);
    this.bytes = grown;
  }

  byte(b: number): void {
    this.room(1);
    this.bytes[this.at++] = b;
  }

  /** The text's UTF-8 bytes. */
  text(text: string): void {
    this.room(text.length);
    const { bytes } = this;
    let at = this.at;
    for (let i = 0; i < text.length; i++) {
      const c = text.charCodeAt(i);
      if (c >= 0x80) {
        this.room(Buffer.byteLength(text));
        this.at += this.bytes.write(text, this.at, 'utf8');
        return;
      }
      bytes[at++] = c;
    }
    this.at = at;
  }

  /** The text as JSON.stringify writes it (quoted, escaped where JSON needs it). */
  jsonString(text: string): void {
    this.room(text.length + 2);
    const { bytes } = this;
    let at = this.at;
    bytes[at++] = 0x22;
    for (let i = 0; i < text.length; i++) {
      const c = text.charCodeAt(i);
      // Printable ASCII but a quote or a backslash goes as it is; anything else as JSON.stringify has it.
      if (c < 0x20 || c > 0x7e || c === 0x22 || c === 0x5c) {
        this.text(JSON.stringify(text));
        return;
      }
      bytes[at++] = c;
    }
    bytes[at++] = 0x22;
    this.at = at;
  }

  /** A non-negative integer below 2^31, in decimal. */
  int(n: number): void {
    this.room(10);
    if (n < 10) {
      this.bytes[this.at++] = 0x30 + n;
      return;
    }
    let digits = 1;
    for (let v = n; v >= 10; v = Math.floor(v / 10)) digits++;
    let at = this.at + digits;
    this.at = at;
    for (let v = n; digits > 0; digits--, v = Math.floor(v / 10)) this.bytes[--at] = 0x30 + (v % 10);
  }

  /** A 32-bit word as 8 lowercase hex digits. */
  hex8(word: number): void {
    this.room(8);
    const { bytes } = this;
    let at = this.at;
    for (let shift = 24; shift >= 0; shift -= 8) {
      const b = ((word >>> shift) & 255) << 1;
      bytes[at++] = HEX_PAIRS[b];
      bytes[at++] = HEX_PAIRS[b + 1];
    }
    this.at = at;
  }

  /** Another buffer's bytes, as they are. */
  append(bytes: Uint8Array): void {
    this.room(bytes.length);
    this.bytes.set(bytes, this.at);
    this.at += bytes.length;
  }

  /** The bytes so far, as a view of the buffer (valid while nothing more is added). */
  result(): Uint8Array {
    return this.bytes.subarray(0, this.at);
  }

  /** Starts over in the same buffer (a view from result() is overwritten from then on). */
  clear(): void {
    this.at = 0;
  }
}

/** Two hex digits per byte value. */
const HEX_PAIRS = Uint8Array.from({ length: 512 }, (_, i) => '0123456789abcdef'.charCodeAt(i & 1 ? (i >> 1) & 15 : i >> 5));
