/**
 * RFC 4180 reader over raw bytes. It does not build strings for every cell:
 * it records where each cell starts and ends, so numeric columns are parsed
 * straight from the bytes and only text columns (id, label, group) become strings.
 */
import { error, type Problem } from '../problems/problem.js';
import { charColumn, decodeSpan, type Grid } from './grid.js';
import { parseNumberBytes } from './number.js';

export interface DelimitedTable {
  bytes: Uint8Array;
  header: string[];
  /** Number of data rows (header excluded). */
  rows: number;
  cols: number;
  /** Cell c of data row r spans bytes [starts[r*cols+c], ends[r*cols+c]). */
  starts: Int32Array;
  ends: Int32Array;
  /** 1 where the cell was quoted and contains doubled quotes to undo. */
  escaped: Uint8Array;
  /** 1-based line number of each data row's first line, and the byte offset where that line starts. */
  rowLine: Int32Array;
  rowLineStart: Int32Array;
}

const QUOTE = 0x22;
const CR = 0x0d;
const LF = 0x0a;

export type ReadResult = { table: DelimitedTable; problems: Problem[] } | { table: undefined; problems: Problem[] };

export function readDelimited(input: Uint8Array, delimiter: number, file: string): ReadResult {
  let bytes = input;
  if (bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) bytes = bytes.subarray(3);
  const problems: Problem[] = [];
  const n = bytes.length;
  let starts = new Int32Array(1024);
  let ends = new Int32Array(1024);
  let escaped = new Uint8Array(1024);
  let rowLine = new Int32Array(64);
  let rowLineStart = new Int32Array(64);
  let cells = 0;
  let records = 0;
  let cols = -1;
  let line = 1;
  let lineStart = 0;
  let recordCells = 0;
  let i = 0;

  const grow = () => {
    const size = starts.length * 2;
    const s = new Int32Array(size);
    s.set(starts);
    starts = s;
    const e = new Int32Array(size);
    e.set(ends);
    ends = e;
    const x = new Uint8Array(size);
    x.set(escaped);
    escaped = x;
  };

  while (i < n) {
    // Blank lines at the very end of the file are not records.
    let rest = i;
    while (rest < n && (bytes[rest] === LF || bytes[rest] === CR)) rest++;
    if (rest >= n) break;
    const recordLine = line;
    const recordLineStart = lineStart;
    if (records >= rowLine.length) {
      const a = new Int32Array(rowLine.length * 2);
      a.set(rowLine);
      rowLine = a;
      const b = new Int32Array(rowLineStart.length * 2);
      b.set(rowLineStart);
      rowLineStart = b;
    }
    rowLine[records] = recordLine;
    rowLineStart[records] = recordLineStart;
    recordCells = 0;
    let endOfRecord = false;
    while (!endOfRecord) {
      if (cells >= starts.length) grow();
      let start = i;
      let end: number;
      let esc = 0;
      if (i < n && bytes[i] === QUOTE) {
        const quoteLine = line;
        const quoteCol = i - lineStart + 1;
        i++;
        start = i;
        for (;;) {
          if (i >= n) {
            problems.push(
              error('csv-unclosed-quote', 'a quoted cell is never closed', { file, position: { line: quoteLine, col: quoteCol } }),
            );
            return { table: undefined, problems };
          }
          const b = bytes[i];
          if (b === QUOTE) {
            if (i + 1 < n && bytes[i + 1] === QUOTE) {
              esc = 1;
              i += 2;
              continue;
            }
            break;
          }
          if (b === LF) {
            line++;
            lineStart = i + 1;
          }
          i++;
        }
        end = i;
        i++; // closing quote
        if (i < n && bytes[i] !== delimiter && bytes[i] !== LF && bytes[i] !== CR) {
          problems.push(
            error('csv-text-after-quote', 'text follows the closing quote of a cell', { file, position: { line, col: i - lineStart + 1 } }),
          );
          return { table: undefined, problems };
        }
      } else {
        while (i < n) {
          const b = bytes[i];
          if (b === delimiter || b === LF || b === CR) break;
          i++;
        }
        end = i;
      }
      starts[cells] = start;
      ends[cells] = end;
      escaped[cells] = esc;
      cells++;
      recordCells++;
      if (i >= n) {
        endOfRecord = true;
        break;
      }
      const b = bytes[i];
      if (b === delimiter) {
        i++;
        if (i >= n) {
          if (cells >= starts.length) grow();
          starts[cells] = i;
          ends[cells] = i;
          escaped[cells] = 0;
          cells++;
          recordCells++;
          endOfRecord = true;
        }
        continue;
      }
      if (b === CR) i++;
      if (i < n && bytes[i] === LF) i++;
      line++;
      lineStart = i;
      endOfRecord = true;
    }
    if (cols === -1) cols = recordCells;
    else if (recordCells !== cols) {
      problems.push(
        error('csv-ragged-row', `row has ${recordCells} cells but the header has ${cols}`, {
          file,
          position: { line: recordLine, col: 1 },
        }),
      );
      if (problems.length >= 20) return { table: undefined, problems };
    }
    records++;
  }
  if (problems.length > 0) return { table: undefined, problems };
  if (records === 0) {
    problems.push(error('data-empty', 'the data file is empty', { file, position: { line: 1, col: 1 } }));
    return { table: undefined, problems };
  }
  const header: string[] = [];
  for (let c = 0; c < cols; c++) header.push(cellString(bytes, starts[c], ends[c], escaped[c] === 1));
  const rows = records - 1;
  return {
    table: {
      bytes,
      header,
      rows,
      cols,
      starts: starts.subarray(cols, cols + rows * cols),
      ends: ends.subarray(cols, cols + rows * cols),
      escaped: escaped.subarray(cols, cols + rows * cols),
      rowLine: rowLine.subarray(1, records),
      rowLineStart: rowLineStart.subarray(1, records),
    },
    problems,
  };
}

export function cellString(bytes: Uint8Array, start: number, end: number, escaped: boolean): string {
  const s = decodeSpan(bytes, start, end);
  return escaped ? s.replaceAll('""', '"') : s;
}

/** The text of every cell of one column. */
export function textColumn(t: DelimitedTable, col: number): string[] {
  const out = new Array<string>(t.rows);
  for (let r = 0; r < t.rows; r++) {
    const k = r * t.cols + col;
    out[r] = cellString(t.bytes, t.starts[k], t.ends[k], t.escaped[k] === 1);
  }
  return out;
}

/** 1-based line and character column of a cell, for messages. */
export function cellPosition(t: DelimitedTable, row: number, col: number): { line: number; col: number } {
  const at = charColumn(t.bytes, t.rowLineStart[row], t.starts[row * t.cols + col]);
  return { line: t.rowLine[row] + at.lineOffset, col: at.col };
}

/** The full reader's table seen as a Grid. */
export function delimitedGrid(t: DelimitedTable): Grid {
  return {
    header: t.header,
    rows: t.rows,
    rowLine: t.rowLine,
    text: (r, c) => {
      const k = r * t.cols + c;
      return cellString(t.bytes, t.starts[k], t.ends[k], t.escaped[k] === 1);
    },
    number: (r, c) => {
      const k = r * t.cols + c;
      return parseNumberBytes(t.bytes, t.starts[k], t.ends[k]);
    },
    position: (r, c) => cellPosition(t, r, c),
    extract(numberCols, textCols) {
      const width = numberCols.length;
      const numbers = new Float64Array(t.rows * width);
      const failed: number[] = [];
      for (let r = 0; r < t.rows; r++) {
        const base = r * t.cols;
        for (let j = 0; j < width; j++) {
          const k = base + numberCols[j];
          const v = parseNumberBytes(t.bytes, t.starts[k], t.ends[k]);
          if (v !== v) failed.push(r * width + j);
          numbers[r * width + j] = v;
        }
      }
      return { numbers, failed, texts: textCols.map((c) => textColumn(t, c)) };
    },
  };
}
