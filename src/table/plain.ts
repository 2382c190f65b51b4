/**
 * The fast reader for the common large case: a delimited file without a single quote
 * character. Then every line is one record and every delimiter ends a cell, so lines are
 * found with the native byte search, and numeric cells are parsed in the same pass that finds
 * them. It reads exactly what the full RFC 4180 reader reads (a property test holds them
 * together); when a file is not that simple it returns undefined and the full reader takes over.
 */
import { charColumn, decodeSpan, type Extracted, type Grid } from './grid.js';
import { parseNumberBytes } from './number.js';
import { decodeTexts, extractRows, type RowsPart } from './plain-rows.js';

export type { RowsPart };

const QUOTE = 0x22;
const CR = 0x0d;
const LF = 0x0a;

export interface PlainTable {
  bytes: Uint8Array;
  delimiter: number;
  header: string[];
  rows: number;
  cols: number;
  /** Byte span of each data row's line, without its line break. */
  rowStart: Int32Array;
  rowEnd: Int32Array;
}

export function readPlain(input: Uint8Array, delimiter: number): PlainTable | undefined {
  let bytes = input;
  if (bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) bytes = bytes.subarray(3);
  // Buffer's byte search is several times faster than TypedArray indexOf, shared memory included.
  const search = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.length);
  if (search.indexOf(QUOTE) !== -1) return undefined;
  // Blank lines at the very end are not records (as in the full reader).
  let n = bytes.length;
  while (n > 0 && (bytes[n - 1] === LF || bytes[n - 1] === CR)) n--;
  if (n === 0) return undefined;
  let starts = new Int32Array(1024);
  let ends = new Int32Array(1024);
  let records = 0;
  let crs = 0;
  for (let i = 0; i < n; records++) {
    let stop = search.indexOf(LF, i);
    if (stop === -1 || stop > n) stop = n;
    let end = stop;
    if (end > i && bytes[end - 1] === CR) {
      end--;
      crs++;
    }
    if (records === starts.length) {
      starts = grown(starts);
      ends = grown(ends);
    }
    starts[records] = i;
    ends[records] = end;
    i = stop + 1;
  }
  // A carriage return that is not part of CR LF is a line break to the full reader: leave such files to it.
  if (countByte(search, CR, n) !== crs) return undefined;
  const header: string[] = [];
  for (let i = starts[0]; ; ) {
    let stop = search.indexOf(delimiter, i);
    if (stop === -1 || stop > ends[0]) stop = ends[0];
    header.push(decodeSpan(bytes, i, stop));
    if (stop === ends[0]) break;
    i = stop + 1;
  }
  return {
    bytes,
    delimiter,
    header,
    rows: records - 1,
    cols: header.length,
    rowStart: starts.slice(1, records),
    rowEnd: ends.slice(1, records),
  };
}

function grown(a: Int32Array<ArrayBuffer>): Int32Array<ArrayBuffer> {
  const b = new Int32Array(a.length * 2);
  b.set(a);
  return b;
}

function countByte(search: Buffer, value: number, n: number): number {
  let count = 0;
  for (let i = search.indexOf(value); i !== -1 && i < n; i = search.indexOf(value, i + 1)) count++;
  return count;
}

/** Where row r's line lies: in `bytes`, from `start` to `end` (without its line break). Filled in by a RowLine. */
export interface LineAt {
  bytes: Uint8Array;
  start: number;
  end: number;
}

/** Fills `into` with where row r's line lies (the bytes may be a stretch of the file read for it). */
export type RowLine = (r: number, into: LineAt) => void;

/**
 * A grid's single cells (text, number, position), found by walking a row from its start. The walk
 * resumes where the last one stopped when it moves right along the same row, so probing every
 * column of a row costs one pass, not one per column (20,000 columns would make that quadratic).
 */
export function rowCells(line: RowLine, delimiter: number): Pick<Grid, 'text' | 'number' | 'position'> {
  const at: LineAt = { bytes: new Uint8Array(0), start: 0, end: 0 };
  let row = -1;
  let col = 0;
  let offset = 0; // where cell `col` of `row` starts, from the line's start
  const span = (r: number, c: number): [number, number] => {
    line(r, at);
    const { bytes, start, end } = at;
    if (r !== row || c < col) {
      row = r;
      col = 0;
      offset = 0;
    }
    for (; col < c; col++) {
      const stop = bytes.indexOf(delimiter, start + offset);
      if (stop === -1 || stop >= end) {
        row = -1;
        return [end, end];
      } // past the row's last cell
      offset = stop + 1 - start;
    }
    const stop = bytes.indexOf(delimiter, start + offset);
    return [start + offset, stop === -1 || stop >= end ? end : stop];
  };
  return {
    text: (r, c) => {
      const [s, e] = span(r, c);
      return decodeSpan(at.bytes, s, e);
    },
    number: (r, c) => {
      const [s, e] = span(r, c);
      return parseNumberBytes(at.bytes, s, e);
    },
    position: (r, c) => {
      const [s] = span(r, c);
      return { line: r + 2, col: charColumn(at.bytes, at.start, s).col };
    },
  };
}

/**
 * Lets the shell extract part of the rows on another thread while this one does the rest:
 * `numbers` allocates an array both can write, `start` begins rows [from, to) and returns a
 * function that waits for them (undefined when they turned out ragged).
 */
export interface RowHelper {
  numbers(length: number): Float64Array;
  start(
    t: PlainTable,
    numberCols: readonly number[],
    textCols: readonly number[],
    from: number,
    to: number,
    numbers: Float64Array,
  ): () => RowsPart | undefined;
}

export function plainGrid(t: PlainTable, helper?: RowHelper): Grid {
  const line: RowLine = (r, into) => {
    into.bytes = t.bytes;
    into.start = t.rowStart[r];
    into.end = t.rowEnd[r];
  };
  return {
    header: t.header,
    rows: t.rows,
    rowLine: Int32Array.from({ length: t.rows }, (_, r) => r + 2),
    ...rowCells(line, t.delimiter),
    numbersOf(rows, cols) {
      const out = new Float64Array(rows * cols.length);
      return extractRows(t, cols, [], 0, rows, out) && out;
    },
    extract: (numberCols, textCols) => (helper ? extractShared(t, numberCols, textCols, helper) : extractPlain(t, numberCols, textCols)),
  };
}

function extractPlain(t: PlainTable, numberCols: readonly number[], textCols: readonly number[]): Extracted | undefined {
  const numbers = new Float64Array(t.rows * numberCols.length);
  const part = extractRows(t, numberCols, textCols, 0, t.rows, numbers);
  return (
    part && { numbers, failed: part.failed, texts: decodeTexts(t.bytes, [part.spans], textCols.length), inRange: part.outOfRange === 0 }
  );
}

function extractShared(
  t: PlainTable,
  numberCols: readonly number[],
  textCols: readonly number[],
  helper: RowHelper,
): Extracted | undefined {
  const numbers = helper.numbers(t.rows * numberCols.length);
  // The other thread starts later (it is still loading when the file arrives): give it less.
  const mid = Math.floor(t.rows * 0.55);
  const upper = helper.start(t, numberCols, textCols, mid, t.rows, numbers);
  const lower = extractRows(t, numberCols, textCols, 0, mid, numbers);
  const other = upper();
  if (!lower || !other) return undefined;
  return {
    numbers,
    failed: [...lower.failed, ...other.failed],
    texts: decodeTexts(t.bytes, [lower.spans, other.spans], textCols.length),
    inRange: lower.outOfRange + other.outOfRange === 0,
  };
}
