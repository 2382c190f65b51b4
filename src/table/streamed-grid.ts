/**
 * The fast reader over a file that is never held whole: the rows are read in stretches of a few
 * megabytes into one reused buffer (line-index.ts found where they lie), parsed by extractRows,
 * and let go. A large table then costs its matrix, not its file's bytes too, and no fresh memory
 * is touched for the file (here about 3 ms per megabyte). Reading is the caller's: `readInto`
 * fills a buffer from a file offset. Cells asked for one at a time (the column probe, messages,
 * the audit's other columns) come from a small cache of the last stretch read.
 */
import { columnDecoder, type Extracted, type Grid } from './grid.js';
import { rowCells, type RowLine } from './plain.js';
import type { LineIndex } from './line-index.js';
import { extractRows, type RowBytes, type RowsPart } from './plain-rows.js';

/** Fills into[0, length) with the file's bytes from `offset`. */
export type ReadInto = (offset: number, into: Uint8Array, length: number) => void;

/** Rows the other thread parsed, [from, rows): their text cells' bytes copied into `arena`, the spans into it. */
export interface StretchRows extends RowsPart {
  arena: Uint8Array;
  from: number;
}

/**
 * How two threads share the rows without knowing ahead which is faster: the rows are cut into
 * stretches (`starts`: each stretch's first row, then the row count), and each thread claims one
 * stretch at a time by adding 1 to `taken` — this thread from the front, the other from the back —
 * until every stretch is claimed. Each thread's rows stay one run, and they meet where they meet.
 */
export interface StretchClaims {
  starts: Int32Array;
  taken: Int32Array;
}

/** The other thread's share: the stretches it claims from the back, parsed into the shared numbers from the file itself. */
export interface StretchHelper {
  numbers(length: number): Float64Array;
  /** Shared memory for the claims (another thread reads it). */
  claims(stretches: number): Int32Array;
  start(
    numberCols: readonly number[],
    textCols: readonly number[],
    claims: StretchClaims,
    numbers: Float64Array,
  ): () => StretchRows | undefined;
}

/** Bytes per stretch while extracting. */
export const STRETCH = 1 << 20;
/** Bytes per stretch of the cache for single cells. */
const CELL_STRETCH = 1 << 20;

/** The first row of each stretch of at most `limit` bytes (at least one row each), then the row count. */
export function stretchStarts(
  ix: Pick<LineIndex, 'rowStart' | 'rowEnd' | 'rows'>,
  limit: number,
  into?: (n: number) => Int32Array,
): Int32Array {
  const starts: number[] = [];
  for (let r0 = 0; r0 < ix.rows; r0 = stretchEnd(ix, r0, ix.rows, limit)) starts.push(r0);
  starts.push(ix.rows);
  const out = into ? into(starts.length) : new Int32Array(starts.length);
  out.set(starts);
  return out;
}

/** The end of the stretch that starts at row r0: whole rows within `limit` bytes, at least one. */
function stretchEnd(ix: Pick<LineIndex, 'rowStart' | 'rowEnd'>, r0: number, to: number, limit: number): number {
  const stop = ix.rowStart[r0] + limit;
  let r1 = r0 + 1;
  while (r1 < to && ix.rowEnd[r1] <= stop) r1++;
  return r1;
}

/**
 * Claims stretches (from the front, or from the back) until none is left, reading each and
 * handing it to `each`. False when `each` found ragged rows: the other thread then stops at its
 * next claim too.
 */
export function claimStretches(
  ix: Pick<LineIndex, 'rowStart' | 'rowEnd'>,
  claims: StretchClaims,
  fromBack: boolean,
  readInto: ReadInto,
  each: (bytes: Uint8Array, base: number, from: number, to: number) => boolean,
): boolean {
  const { starts, taken } = claims;
  const count = starts.length - 1;
  let buffer = new Uint8Array(0);
  for (let k = 0; Atomics.add(taken, 0, 1) < count; k++) {
    const s = fromBack ? count - 1 - k : k;
    const r0 = starts[s];
    const r1 = starts[s + 1];
    const base = ix.rowStart[r0];
    const length = ix.rowEnd[r1 - 1] - base;
    if (buffer.length < length) buffer = new Uint8Array(length);
    readInto(base, buffer, length);
    if (!each(buffer.subarray(0, length), base, r0, r1)) {
      Atomics.store(taken, 0, count);
      return false;
    }
  }
  return true;
}

export function streamedGrid(ix: LineIndex, read: { rows: ReadInto; cells: ReadInto }, helper?: StretchHelper, limit = STRETCH): Grid {
  const rowBytes = (bytes: Uint8Array): RowBytes => ({
    bytes,
    delimiter: ix.delimiter,
    cols: ix.cols,
    rowStart: ix.rowStart,
    rowEnd: ix.rowEnd,
  });
  // The stretch holding the row last asked for.
  const cache = { from: 0, to: 0, base: 0, bytes: new Uint8Array(0) };
  const line: RowLine = (r, into) => {
    if (r < cache.from || r >= cache.to) {
      const to = stretchEnd(ix, r, ix.rows, Math.min(limit, CELL_STRETCH));
      const length = ix.rowEnd[to - 1] - ix.rowStart[r];
      if (cache.bytes.length < length) cache.bytes = new Uint8Array(Math.max(length, Math.min(limit, CELL_STRETCH)));
      read.cells(ix.rowStart[r], cache.bytes, length);
      Object.assign(cache, { from: r, to, base: ix.rowStart[r] });
    }
    into.bytes = cache.bytes;
    into.start = ix.rowStart[r] - cache.base;
    into.end = ix.rowEnd[r] - cache.base;
  };
  return {
    header: ix.header,
    rows: ix.rows,
    rowLine: Int32Array.from({ length: ix.rows }, (_, r) => r + 2),
    ...rowCells(line, ix.delimiter),
    numbersOf(rows, cols) {
      const base = ix.rowStart[0];
      const bytes = new Uint8Array(ix.rowEnd[rows - 1] - base);
      read.cells(base, bytes, bytes.length);
      const out = new Float64Array(rows * cols.length);
      return extractRows(rowBytes(bytes), cols, [], 0, rows, out, base) && out;
    },
    extract(numberCols, textCols): Extracted | undefined {
      const width = numberCols.length;
      const numbers = helper ? helper.numbers(ix.rows * width) : new Float64Array(ix.rows * width);
      const starts = stretchStarts(ix, limit, helper?.claims);
      const claims = { starts, taken: helper ? helper.claims(1) : new Int32Array(1) };
      const upper = helper?.start(numberCols, textCols, claims, numbers);
      const texts = textCols.map(() => new Array<string>(ix.rows));
      const decode = textCols.map(() => columnDecoder());
      const failed: number[] = [];
      let outOfRange = 0;
      const whole = claimStretches(ix, claims, false, read.rows, (bytes, base, from, to) => {
        const part = extractRows(rowBytes(bytes), numberCols, textCols, from, to, numbers, base);
        if (!part) return false;
        for (const f of part.failed) failed.push(f);
        outOfRange += part.outOfRange;
        const { spans } = part;
        for (let r = from, o = 0; r < to; r++)
          for (let k = 0; k < textCols.length; k++, o += 2) texts[k][r] = decode[k](bytes, spans[o], spans[o + 1]);
        return true;
      });
      const other = upper?.();
      if (!whole || (upper && !other)) return undefined;
      if (other) {
        for (const f of other.failed) failed.push(f);
        outOfRange += other.outOfRange;
        const { spans, arena } = other;
        for (let r = other.from, o = 0; r < ix.rows; r++)
          for (let k = 0; k < textCols.length; k++, o += 2) texts[k][r] = decode[k](arena, spans[o], spans[o + 1]);
      }
      return { numbers, failed, texts, inRange: outOfRange === 0 };
    },
  };
}

/**
 * The other thread's side of extract: the stretches it claims from the back, read and parsed
 * into the shared numbers; each text cell's bytes are copied into one arena (the read buffer is
 * reused), its spans pointing there, in row order.
 */
export function extractStretches(
  ix: Pick<LineIndex, 'rowStart' | 'rowEnd' | 'delimiter' | 'cols' | 'rows'>,
  numberCols: readonly number[],
  textCols: readonly number[],
  claims: StretchClaims,
  numbers: Float64Array,
  readInto: ReadInto,
): StretchRows | undefined {
  // Claimed from the back: each stretch's failed cells and spans are kept apart, then put in row order.
  const parts: { failed: number[]; spans: Int32Array }[] = [];
  let outOfRange = 0;
  let arena = new Uint8Array(1 << 16);
  let used = 0;
  let from = ix.rows;
  const whole = claimStretches(ix, claims, true, readInto, (bytes, base, r0, r1) => {
    const part = extractRows(
      { bytes, delimiter: ix.delimiter, cols: ix.cols, rowStart: ix.rowStart, rowEnd: ix.rowEnd },
      numberCols,
      textCols,
      r0,
      r1,
      numbers,
      base,
    );
    if (!part) return false;
    const spans = part.spans;
    for (let o = 0; o < spans.length; o += 2) {
      const s = spans[o];
      const e = spans[o + 1];
      if (used + e - s > arena.length) {
        const grown = new Uint8Array(Math.max(arena.length * 2, used + e - s));
        grown.set(arena.subarray(0, used));
        arena = grown;
      }
      spans[o] = used;
      // Cells are short (ids, labels): a loop beats a subarray and a copy call per cell.
      for (let i = s; i < e; i++) arena[used++] = bytes[i];
      spans[o + 1] = used;
    }
    parts.push({ failed: part.failed, spans });
    outOfRange += part.outOfRange;
    from = r0;
    return true;
  });
  if (!whole) return undefined;
  parts.reverse();
  const spans = new Int32Array((ix.rows - from) * textCols.length * 2);
  let at = 0;
  for (const p of parts) {
    spans.set(p.spans, at);
    at += p.spans.length;
  }
  return { failed: parts.flatMap((p) => p.failed), outOfRange, spans, arena: arena.subarray(0, used), from };
}
