/**
 * The fast reader's first pass (see plain.ts) over a file that is read in stretches rather than
 * held whole: where every line starts and ends, the header's cells, and whether the file is one
 * the fast reader may read at all — no quote character, no carriage return except before a line
 * feed, valid UTF-8, no NUL byte or known binary signature at the start. A file that is not is
 * left to the whole-file readers, which also report what is wrong with it. Pure: it is fed the
 * stretches in order.
 *
 * The lines are those readPlain finds: a byte-order mark at the start is skipped, every line feed
 * ends a line (a carriage return before it is not part of the line), and blank lines at the very
 * end are not records. The header is the first line.
 */
import { isUtf8 } from 'node:buffer';
import { decodeSpan } from './grid.js';
import { SIGNATURES } from './content-check.js';

const QUOTE = 0x22;
const CR = 0x0d;
const LF = 0x0a;

export interface LineIndex {
  header: string[];
  /** Data rows (the header not counted). */
  rows: number;
  cols: number;
  delimiter: number;
  /** File offsets of each data row's line: its first byte and the byte after its last (line break excluded). */
  rowStart: Float64Array<ArrayBufferLike>;
  rowEnd: Float64Array<ArrayBufferLike>;
}

export class LineIndexer {
  private starts: Float64Array<ArrayBufferLike>;
  private ends: Float64Array<ArrayBufferLike>;
  private count = 0;
  private crs = 0;
  private strippedCrs = 0;
  /** The file is not one for the fast reader (nothing more needs to be read). */
  refused = false;
  private header: string[] | undefined;
  private lineStart = 0;

  /**
   * `size`: the file's size, to make room for about as many lines as the first stretch promises
   * (growing a large array again and again touches fresh memory each time); `offsets` makes the
   * arrays of offsets (shared memory, for another thread to read them without a copy).
   */
  constructor(
    private readonly delimiter: number,
    private readonly size = 0,
    private readonly offsets: (length: number) => Float64Array<ArrayBufferLike> = (n) => new Float64Array(n),
  ) {
    this.starts = offsets(1024);
    this.ends = offsets(1024);
  }

  /**
   * `bytes` are the file's bytes from offset `at`, which is where the previous call's stretch
   * ended (0 first). Returns how many of them were taken: up to and including the last line feed,
   * or all of them when `last` (the stretch reaches the end of the file). The next stretch starts
   * after what was taken; 0 taken means no line ends within the stretch: give a longer one.
   */
  take(bytes: Uint8Array, at: number, last: boolean): number {
    if (this.refused) return bytes.length;
    const search = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.length);
    if (at === 0) {
      const head = bytes.subarray(0, 8192);
      if (head.includes(0) || SIGNATURES.some(([, magic]) => magic.every((b, i) => bytes[i] === b))) return this.refuse(bytes);
      if (bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) this.lineStart = 3;
    }
    const lastLf = search.lastIndexOf(LF);
    const taken = last ? bytes.length : lastLf + 1;
    if (taken === 0) return 0;
    const whole = bytes.subarray(0, taken);
    if (search.indexOf(QUOTE) !== -1 || !isUtf8(whole)) return this.refuse(bytes);
    for (let i = search.indexOf(CR); i !== -1 && i < taken; i = search.indexOf(CR, i + 1)) this.crs++;
    for (let i = search.indexOf(LF); i !== -1 && i < taken; i = search.indexOf(LF, i + 1)) {
      const p = at + i;
      let end = p;
      if (end > this.lineStart && bytes[i - 1] === CR) {
        end--;
        this.strippedCrs++;
      }
      this.record(bytes, at, end);
      this.lineStart = p + 1;
    }
    if (last && this.lineStart < at + taken) this.record(bytes, at, at + taken);
    if (at === 0 && this.count > 0) this.reserve(Math.ceil((this.size / taken) * this.count * 1.1) + 64);
    return taken;
  }

  /** The index once every stretch was taken; undefined when the file is not one for the fast reader. */
  done(): LineIndex | undefined {
    if (this.refused || this.crs !== this.strippedCrs) return undefined;
    let n = this.count;
    while (n > 0 && this.starts[n - 1] === this.ends[n - 1]) n--;
    if (n === 0 || !this.header) return undefined;
    return {
      header: this.header,
      rows: n - 1,
      cols: this.header.length,
      delimiter: this.delimiter,
      rowStart: this.starts.subarray(1, n),
      rowEnd: this.ends.subarray(1, n),
    };
  }

  private record(bytes: Uint8Array, at: number, end: number): void {
    if (this.count === this.starts.length) this.reserve(this.starts.length * 2);
    if (this.count === 0) this.header = cells(bytes, this.lineStart - at, end - at, this.delimiter);
    this.starts[this.count] = this.lineStart;
    this.ends[this.count] = end;
    this.count++;
  }

  private reserve(length: number): void {
    if (length <= this.starts.length) return;
    const starts = this.offsets(length);
    const ends = this.offsets(length);
    starts.set(this.starts.subarray(0, this.count));
    ends.set(this.ends.subarray(0, this.count));
    this.starts = starts;
    this.ends = ends;
  }

  private refuse(bytes: Uint8Array): number {
    this.refused = true;
    return bytes.length;
  }
}

function cells(bytes: Uint8Array, start: number, end: number, delimiter: number): string[] {
  const out: string[] = [];
  for (let i = start; ; ) {
    let stop = bytes.indexOf(delimiter, i);
    if (stop === -1 || stop > end) stop = end;
    out.push(decodeSpan(bytes, i, stop));
    if (stop === end) return out;
    i = stop + 1;
  }
}
