/**
 * Parquet files (the columnar format applied ML teams keep feature tables in): numeric columns
 * straight into one row-major Float64Array, others as text. Recognized by their magic bytes
 * ("PAR1" at both ends), whatever their name. The footer is read by parquet-footer.ts; flat numeric
 * and text columns are decoded by parquet-pages.ts straight into their arrays, any other column
 * by hyparquet's general reader (loaded only then). gzip and Brotli pages are decompressed with
 * node:zlib, snappy by snappy.ts; other codecs are reported.
 */
import { error, type Problem } from '../problems/problem.js';
import type { ColumnTable } from '../table/columns.js';
import { compressors, decompress } from './parquet-codecs.js';
import { type ParquetFooter, readFooter } from './parquet-footer.js';
import { forcedThreads } from './threads.js';
import {
  decodeColumn,
  decodeNumberColumns,
  fastKind,
  NeedsGeneralReader,
  type NumberColumnsDone,
  plainNumber,
  Scratch,
} from './parquet-pages.js';

export { isParquet } from './parquet-magic.js';

export async function readParquet(
  bytes: Uint8Array,
  shownAs: string,
  where: Partial<Problem> = {},
  twin?: ParquetTwin,
): Promise<{ table: ColumnTable; problem?: undefined } | { problem: Problem }> {
  const fail = (why: string, hint?: string) => ({
    problem: error('data-bad-parquet', `file ${shownAs} is a Parquet file foldseal cannot read: ${why}`, { ...where, hint }),
  });
  let footer: ParquetFooter;
  try {
    footer = readFooter(bytes);
  } catch (e) {
    const message = (e as Error).message;
    return fail(message, /codec/.test(message) ? CODEC_HINT : undefined);
  }
  const [root, ...leaves] = footer.schema;
  if (leaves.length !== root.children || leaves.some((s) => s.children))
    return fail('it has nested columns', 'write a flat table: one column per feature');
  const names = leaves.map((s) => s.name);
  const numeric = leaves.map(plainNumber);
  try {
    return { table: await decodeColumns(bytes, footer, names, numeric, twin) };
  } catch (e) {
    const message = (e as Error).message;
    return fail(message, /compress|codec/i.test(message) ? CODEC_HINT : undefined);
  }
}

const CODEC_HINT = 'write it with snappy, gzip, Brotli or no compression';

/**
 * Another thread that decodes a share of the numeric columns into the shared block, given the
 * file in shared memory; its answer waits for it: the columns it gave back, or a broken file.
 */
export type ParquetTwin = {
  numbers(length: number): Float64Array;
  parquet(job: {
    file: Uint8Array;
    /** As this thread read it (plain data: the other thread need not read it again). */
    footer: ParquetFooter;
    cols: number[];
    slots: number[];
    numbers: Float64Array;
    width: number;
    /**
     * Two flags: [0] set to 1 once the other thread has touched numbers[touch[0]..touch[1]),
     * [1] set to 1 by this thread once it has touched the rest; neither thread writes a value
     * before both are set (a touch after the other's write would zero it).
     */
    ready: Int32Array;
    touch: [number, number];
    /** Shared with this thread: the next column (in `cols`) not yet taken. */
    claim: Int32Array;
  }): () => NumberColumnsDone;
};

/** Below this many compressed bytes of numeric columns a second thread is not worth its message (FOLDSEAL_THREADS=2 forces it). */
const TWIN_BYTES = 4 * 1024 * 1024;

/**
 * The columns of a Parquet file: numeric ones into their slot of one row-major block (NaN where
 * null), others as text. Flat numeric and text columns take the fast path (parquet-pages.ts), the
 * numeric ones shared with `twin` when the file is large and in shared memory; the rest, and any
 * column that path gives back, go through hyparquet's general reader.
 */
async function decodeColumns(
  file: Uint8Array,
  footer: ParquetFooter,
  names: string[],
  numeric: boolean[],
  twin: ParquetTwin | undefined,
): Promise<ColumnTable> {
  const { rows } = footer;
  let width = 0;
  const columns = names.map((_, c) => (numeric[c] ? width++ : new Array<string>(rows)));
  const fast = names.map((_, c) => fastKind(footer.schema[c + 1]) === (numeric[c] ? 'number' : 'text'));
  const numberCols = names.flatMap((_, c) => (fast[c] && numeric[c] ? [c] : []));
  let total = 0;
  for (const c of numberCols) for (const g of footer.groups) total += g.chunks[c]?.size ?? 0;
  const shared = twin !== undefined && file.buffer instanceof SharedArrayBuffer && (total >= TWIN_BYTES || (forcedThreads() ?? 0) >= 2);
  const numbers = shared ? twin.numbers(rows * width) : new Float64Array(rows * width);
  const slots = numberCols.map((c) => columns[c] as number);
  // Both threads take the next column not yet taken from a shared counter.
  const claim = new Int32Array(new SharedArrayBuffer(4));
  // Fresh memory is slow to touch the first time: before either thread writes a cell, this one
  // touches the first third of the block's rows and decodes the text columns while the other
  // finishes hashing the file and touches the rest; each signals `ready` and waits for the other.
  const ready = new Int32Array(new SharedArrayBuffer(8));
  const third = Math.floor(rows / 3) * width;
  const answer =
    shared && numberCols.length > 1
      ? twin.parquet({ file, footer, cols: numberCols, slots, numbers, width, ready, touch: [third, rows * width], claim })
      : undefined;
  if (answer) {
    numbers.fill(0, 0, third);
    Atomics.store(ready, 1, 1);
    Atomics.notify(ready, 1);
  }
  const scratch = new Scratch();
  const back: number[] = [];
  names.forEach((_, c) => {
    const column = columns[c];
    if (typeof column === 'number' || !fast[c]) return;
    try {
      decodeColumn(file, footer, c, { texts: column }, decompress, scratch);
    } catch (e) {
      if (!(e instanceof NeedsGeneralReader)) throw e;
      back.push(c);
    }
  });
  while (answer && Atomics.load(ready, 0) === 0) Atomics.wait(ready, 0, 0, 1000);
  const here = decodeNumberColumns(file, footer, numberCols, slots, numbers, width, decompress, answer && claim);
  const other = answer?.();
  // The first broken column in file order, whichever thread met it.
  const broken = [here.broken, other?.broken].reduce((a, b) => (!a || (b && b.at < a.at) ? b : a));
  if (broken) throw new Error(broken.message);
  back.push(...here.back, ...(other?.back ?? []));
  const suspect = here.suspect + (other?.suspect ?? 0);
  const general: string[] = [];
  names.forEach((name, c) => {
    const column = columns[c];
    if (fast[c] && !back.includes(c)) return;
    // The general reader skips nulls, so its columns start filled.
    if (typeof column === 'number') for (let r = 0; r < rows; r++) numbers[r * width + column] = Number.NaN;
    else column.fill('');
    general.push(name);
  });
  // Every number checked while decoding (none given to the general reader): the table need not scan them.
  const checked = !names.some((_, c) => typeof columns[c] === 'number' && (!fast[c] || back.includes(c)));
  const table: ColumnTable = { names, rows, columns, numbers, width, inRange: checked && suspect === 0 };
  if (!general.length) return table;
  // Loaded only here: the library's entry costs ~45 ms of start-up.
  const { parquetMetadata, parquetRead } = await import('hyparquet');
  const metadata = parquetMetadata(file);
  const at = new Map(names.map((name, c) => [name, c]));
  await parquetRead({
    // Slices are copied: the file may sit in shared memory, which the library does not take.
    file: { byteLength: file.byteLength, slice: (start, end) => file.slice(start, end).buffer },
    metadata,
    columns: general,
    compressors,
    onChunk: ({ columnName, columnData, rowStart }) => {
      const column = columns[at.get(columnName) as number];
      for (let i = 0; i < columnData.length; i++) {
        const v = columnData[i] as unknown;
        if (v === null || v === undefined) continue;
        if (typeof column === 'number') numbers[(rowStart + i) * width + column] = typeof v === 'bigint' ? Number(v) : (v as number);
        else column[rowStart + i] = typeof v === 'string' ? v : String(v);
      }
    },
  });
  return table;
}
