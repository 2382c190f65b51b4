/**
 * What building a table needs from a read file, whichever reader read it: the header, one
 * cell's text or number, a cell's position for messages, and one pass that pulls the numeric
 * and text columns out together.
 */
export interface Extracted {
  /** Rows × number columns, row-major; NaN where a cell is not a number. */
  numbers: Float64Array;
  /** Indexes into `numbers` of the cells that did not parse, ascending. */
  failed: number[];
  /** Per text column, every row's text. */
  texts: string[][];
  /**
   * Known already: every number that parsed is in the safe range (numeric.ts), so there is nothing
   * to look for again; the cells that failed are in `failed` (a reader that checked while decoding).
   */
  inRange?: boolean;
}

export interface Grid {
  header: string[];
  rows: number;
  /** 1-based line number where each data row starts. */
  rowLine: Int32Array;
  text(row: number, col: number): string;
  /** The cell as a number by the strict grammar of number.ts, NaN when it is not one. */
  number(row: number, col: number): number;
  /** `file` when the cell lies in another file than the table's (a sample sheet's cell in a joined grid). */
  position(row: number, col: number): { line: number; col: number; file?: string };
  /**
   * The first `rows` (at least one) rows' cells of `cols` as number(r, c) gives them, row-major, in one pass (a
   * fast reader's probe of the column types); undefined when a reader has no such pass or a row
   * is ragged (the caller then asks cell by cell).
   */
  numbersOf?(rows: number, cols: readonly number[]): Float64Array | undefined;
  /**
   * One pass over the rows. Undefined when a row turns out not to have the header's cell count:
   * only the fast reader can find that this late, and its caller then reads the file with the
   * full reader, which reports the row where it is.
   */
  extract(numberCols: readonly number[], textCols: readonly number[]): Extracted | undefined;
}

// ignoreBOM: a U+FEFF at the start of a cell is part of the cell (the spec strips a byte-order mark only at the start of a file).
const utf8 = new TextDecoder('utf-8', { ignoreBOM: true });

/** UTF-8 text of bytes [start, end); ASCII cells (nearly all ids and labels) skip the decoder. */
export function decodeSpan(bytes: Uint8Array, start: number, end: number): string {
  for (let i = start; i < end; i++) if (bytes[i] >= 0x80) return utf8.decode(bytes.subarray(start, end));
  // ASCII is its own Latin-1: Buffer's native Latin-1 slice makes the string in one step.
  const offset = bytes.byteOffset;
  return bufferOver(bytes).toString('latin1', offset + start, offset + end);
}

/** Values a column decoder keeps, and how long a kept value may be. */
const KEPT = 16;
const KEPT_BYTES = 64;
/** Cells past the kept values, in a column whose values do not repeat (ids), after which it stops looking. */
const GIVE_UP = 64;

/**
 * decodeSpan for the cells of one column, in order: a cell that repeats one of the column's first
 * few distinct values (a label, a group, a batch) gets that value's string again instead of a new
 * one — a million labels are then two strings, not a million. A column of ever new values (ids)
 * stops looking after a few dozen cells.
 */
export function columnDecoder(): (bytes: Uint8Array, start: number, end: number) => string {
  const keys: Uint8Array[] = [];
  const values: string[] = [];
  let missed = 0;
  return (bytes, start, end) => {
    if (missed > GIVE_UP) return decodeSpan(bytes, start, end);
    const n = end - start;
    for (let k = 0; k < keys.length; k++) {
      const key = keys[k];
      if (key.length !== n) continue;
      let i = 0;
      while (i < n && key[i] === bytes[start + i]) i++;
      if (i === n) return values[k];
    }
    const text = decodeSpan(bytes, start, end);
    if (keys.length < KEPT && n <= KEPT_BYTES) {
      keys.push(bytes.slice(start, end));
      values.push(text);
    } else missed++;
    return text;
  };
}

const views = new WeakMap<ArrayBufferLike, Buffer>();

/** A Buffer over the whole memory behind `bytes` (made once per memory block, no copy). */
function bufferOver(bytes: Uint8Array): Buffer {
  let view = views.get(bytes.buffer);
  if (!view) {
    view = Buffer.from(bytes.buffer);
    views.set(bytes.buffer, view);
  }
  return view;
}

/** 1-based character column of byte `at` on the line starting at byte `lineStart` (UTF-8 aware). */
export function charColumn(bytes: Uint8Array, lineStart: number, at: number): { lineOffset: number; col: number } {
  const prefix = utf8.decode(bytes.subarray(lineStart, at));
  const lastBreak = prefix.lastIndexOf('\n');
  const lineOffset = prefix.split('\n').length - 1;
  const chars = lastBreak === -1 ? prefix.length : prefix.length - lastBreak - 1;
  return { lineOffset, col: chars + 1 };
}

/** Where a cell is, for a problem: its own file when the grid says so, else the table's. */
export function cellAt(t: Grid, row: number, col: number, file: string): { file: string; position: { line: number; col: number } } {
  const p = t.position(row, col);
  return { file: p.file ?? file, position: { line: p.line, col: p.col } };
}
