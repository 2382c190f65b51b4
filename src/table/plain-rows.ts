/**
 * The one pass over a quote-free table's rows (see plain.ts): numbers parsed where they are
 * found, text cells kept as byte spans. Runs on either thread; everything it needs is plain data.
 */
import { columnDecoder } from './grid.js';
import { parseNumberBytes } from './number.js';
import { inSafeRange } from './numeric.js';

const POW10 = [1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15];

/** Rows [from, to) extracted elsewhere (another thread), into the shared numbers array. */
export interface RowsPart {
  failed: number[];
  /** Cells that parsed to a number outside the safe range (numeric.ts); the common shape never is. */
  outOfRange: number;
  /** Start and end byte of each text cell, [(row - from) * textCols + k] pairs. */
  spans: Int32Array;
}

/** Where each row's line lies: byte offsets of its start and its end (without the line break). */
export interface RowBytes {
  bytes: Uint8Array;
  delimiter: number;
  cols: number;
  rowStart: ArrayLike<number>;
  rowEnd: ArrayLike<number>;
}

/**
 * Rows [from, to) into numbers (at their own row positions); failed cells ascending. `base`: the
 * offset in the file of bytes[0], when `bytes` holds only a stretch of the file that covers these
 * rows (the spans are then into `bytes`).
 */
export function extractRows(
  t: RowBytes,
  numberCols: readonly number[],
  textCols: readonly number[],
  from: number,
  to: number,
  numbers: Float64Array,
  base = 0,
): RowsPart | undefined {
  const { cols } = t;
  const numberSlot = new Int32Array(cols).fill(-1);
  numberCols.forEach((c, j) => {
    numberSlot[c] = j;
  });
  const textSlot = new Int32Array(cols).fill(-1);
  textCols.forEach((c, j) => {
    textSlot[c] = j;
  });
  const failed: number[] = [];
  const spans = new Int32Array((to - from) * textCols.length * 2);
  const cells = { numberSlot, textSlot, textCount: textCols.length, width: numberCols.length };
  const outOfRange = scanRows(t.bytes, t.delimiter, cols, t.rowStart, t.rowEnd, cells, from, to, numbers, base, spans, failed);
  if (outOfRange < 0) return undefined;
  // Cells were met in file order; listed feature order may differ within a row.
  failed.sort((a, b) => a - b);
  return { failed, outOfRange, spans };
}

/**
 * The hot loop of extractRows, on its own: a function V8 optimizes once, with nothing after its
 * loop that it has not seen run (code after a long first loop deoptimized it, some 20 ms of a
 * 100,000-row read per thread). The count of cells out of the safe range, or −1 for a row with
 * too few or too many cells.
 */
function scanRows(
  bytes: Uint8Array,
  delimiter: number,
  cols: number,
  rowStart: ArrayLike<number>,
  rowEnd: ArrayLike<number>,
  { numberSlot, textSlot, textCount, width }: { numberSlot: Int32Array; textSlot: Int32Array; textCount: number; width: number },
  from: number,
  to: number,
  numbers: Float64Array,
  base: number,
  spans: Int32Array,
  failed: number[],
): number {
  let outOfRange = 0;
  for (let r = from; r < to; r++) {
    let i = rowStart[r] - base;
    const end = rowEnd[r] - base;
    for (let c = 0; c < cols; c++) {
      const start = i;
      const j = numberSlot[c];
      if (j >= 0) {
        // The common shape [-]digits[.digits] with at most 15 digits is exact as mantissa / 10^k
        // (Clinger 1990), and 0 or between 1e-15 and 1e15 in magnitude, so in the safe range;
        // anything else goes to the full parser.
        let negative = false;
        if (i < end && bytes[i] === 0x2d) {
          negative = true;
          i++;
        }
        let mantissa = 0;
        let digits = 0;
        let scale = 0;
        let b = i < end ? bytes[i] : -1;
        while (b >= 0x30 && b <= 0x39) {
          mantissa = mantissa * 10 + (b - 0x30);
          digits++;
          b = ++i < end ? bytes[i] : -1;
        }
        const intDigits = digits;
        if (b === 0x2e) {
          b = ++i < end ? bytes[i] : -1;
          while (b >= 0x30 && b <= 0x39) {
            mantissa = mantissa * 10 + (b - 0x30);
            digits++;
            scale++;
            b = ++i < end ? bytes[i] : -1;
          }
        }
        let v: number;
        if ((b === delimiter || b === -1) && digits > 0 && digits <= 15 && (intDigits > 0 || scale > 0)) {
          v = mantissa / POW10[scale];
          if (negative) v = -v;
        } else {
          while (i < end && bytes[i] !== delimiter) i++;
          v = parseNumberBytes(bytes, start, i);
          if (v !== v) failed.push(r * width + j);
          else if (!inSafeRange(v)) outOfRange++;
        }
        numbers[r * width + j] = v;
      } else {
        while (i < end && bytes[i] !== delimiter) i++;
      }
      const k = textSlot[c];
      if (k >= 0) {
        const o = ((r - from) * textCount + k) * 2;
        spans[o] = start;
        spans[o + 1] = i;
      }
      if (c < cols - 1) {
        if (i >= end) return -1; // fewer cells than the header
        i++;
      }
    }
    if (i !== end) return -1; // more cells than the header
  }
  return outOfRange;
}

/** Text of every text cell, per text column, from the row parts' spans in row order. */
export function decodeTexts(bytes: Uint8Array, parts: readonly Int32Array[], textCount: number): string[][] {
  const rows = parts.reduce((sum, p) => sum + p.length / (2 * textCount || 1), 0);
  const texts = Array.from({ length: textCount }, () => new Array<string>(rows));
  const decode = texts.map(() => columnDecoder());
  let r = 0;
  for (const spans of parts) {
    for (let o = 0; o < spans.length; r++) {
      for (let k = 0; k < textCount; k++, o += 2) texts[k][r] = decode[k](bytes, spans[o], spans[o + 1]);
    }
  }
  return texts;
}
