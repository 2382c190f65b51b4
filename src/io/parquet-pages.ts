/**
 * The fast path for a Parquet file's flat columns: numbers decoded straight into their slot of one
 * row-major Float64Array (NaN where null), text into one array of strings ('' where null), with
 * no intermediate array of boxed values and one set of reused page buffers. Page headers are read by
 * thrift-compact.ts, the footer by parquet-footer.ts; the page layout follows the Parquet format documentation (data pages v1 and v2, plain and dictionary
 * encodings, the run-length / bit-packed hybrid). A column outside this path (another encoding,
 * a logical type, nesting) is given back, and parquet.ts reads it through hyparquet's general
 * reader instead.
 */
import type { Codec, ParquetFooter, ParquetType, SchemaNode } from './parquet-footer.js';
import { readStruct, type ThriftStruct } from './thrift-compact.js';
import { inSafeRange } from '../table/numeric.js';

/** Thrown (and caught in parquet.ts) when a column needs the general reader. */
export class NeedsGeneralReader extends Error {}

/** Decompresses a page into `into` (exactly its uncompressed size), or throws. */
export type Decompress = (bytes: Uint8Array, into: Uint8Array, codec: Codec) => Uint8Array;

/** Where a column's cells go: a slot of the row-major number block, or an array of texts. */
export type Sink = { block: Float64Array; width: number; slot: number } | { texts: string[] };

const WIDTH: Partial<Record<ParquetType, number>> = { DOUBLE: 8, FLOAT: 4, INT32: 4, INT64: 8 };

/** A plain number column: DOUBLE, FLOAT, INT32 or INT64 with no logical or converted type. */
export function plainNumber(leaf: SchemaNode): boolean {
  return leaf.type !== undefined && WIDTH[leaf.type] !== undefined && !leaf.logical && !leaf.converted;
}

/** Can this leaf take the fast path, and as what? */
export function fastKind(leaf: SchemaNode): 'number' | 'text' | undefined {
  if (leaf.repetition === 'REPEATED' || leaf.type === undefined) return undefined;
  if (plainNumber(leaf)) return 'number';
  const utf8 = (!leaf.logical || leaf.logical === 'STRING') && (!leaf.converted || leaf.converted === 'UTF8');
  return leaf.type === 'BYTE_ARRAY' && utf8 ? 'text' : undefined;
}

/** Buffers reused from page to page (fresh memory is slow to touch the first time). */
export class Scratch {
  private buffers: { bytes: Uint8Array; f64: Float64Array; u32: Uint32Array; u8: Uint8Array } = {
    bytes: new Uint8Array(0),
    f64: new Float64Array(0),
    u32: new Uint32Array(0),
    u8: new Uint8Array(0),
  };
  private take<K extends keyof Scratch['buffers']>(key: K, n: number, make: (n: number) => Scratch['buffers'][K]) {
    if (this.buffers[key].length < n) this.buffers[key] = make(Math.max(n, 2 * this.buffers[key].length));
    return this.buffers[key].subarray(0, n) as Scratch['buffers'][K];
  }
  bytes(n: number): Uint8Array {
    return this.take('bytes', n, (m) => new Uint8Array(m));
  }
  f64(n: number): Float64Array {
    return this.take('f64', n, (m) => new Float64Array(m));
  }
  u32(n: number): Uint32Array {
    return this.take('u32', n, (m) => new Uint32Array(m));
  }
  u8(n: number): Uint8Array {
    return this.take('u8', n, (m) => new Uint8Array(m));
  }
}

const littleEndian = new Uint8Array(Float64Array.of(1).buffer)[7] === 0x3f;

function short(view: DataView, bytes: number): void {
  if (view.byteLength < bytes) throw new Error('a page holds fewer values than its header says');
}

/** `count` plain texts (UTF-8) from `view`. */
function plainTexts(view: DataView, count: number): string[] {
  const texts = new Array<string>(count);
  // Buffer's decoder is several times faster than TextDecoder on many short strings.
  const bytes = Buffer.from(view.buffer, view.byteOffset, view.byteLength);
  for (let i = 0, pos = 0; i < count; i++) {
    short(view, pos + 4);
    const length = view.getUint32(pos, true);
    pos += 4;
    short(view, pos + length);
    texts[i] = bytes.toString('utf8', pos, pos + length);
    pos += length;
  }
  return texts;
}

/** `count` plain numbers of `type` from `view`, into `out`. */
function plainNumbers(view: DataView, type: ParquetType, count: number, out: Float64Array): void {
  short(view, count * (WIDTH[type] as number));
  if (type === 'DOUBLE' && littleEndian)
    // The page's bytes are the array's bytes: one copy.
    new Uint8Array(out.buffer, out.byteOffset, 8 * count).set(new Uint8Array(view.buffer, view.byteOffset, 8 * count));
  else if (type === 'DOUBLE') for (let i = 0; i < count; i++) out[i] = view.getFloat64(8 * i, true);
  else if (type === 'FLOAT') for (let i = 0; i < count; i++) out[i] = view.getFloat32(4 * i, true);
  else if (type === 'INT32') for (let i = 0; i < count; i++) out[i] = view.getInt32(4 * i, true);
  else for (let i = 0; i < count; i++) out[i] = Number(view.getBigInt64(8 * i, true));
}

/**
 * The run-length / bit-packed hybrid: `count` values of `width` bits (at most 24, else the
 * column goes to the general reader) from `bytes[pos..end)`. A bit-packed run is read through a
 * 32-bit accumulator; a run-length run fills.
 */
function hybrid(bytes: Uint8Array, pos: number, end: number, width: number, out: Uint32Array | Uint8Array, count: number): void {
  if (width > 24) throw new NeedsGeneralReader();
  const mask = width === 0 ? 0 : 0xffffffff >>> (32 - width);
  let n = 0;
  while (n < count) {
    // The run header, a varint, read in place: a shared reader with a cursor object cost about 3 %
    // of a whole Parquet read (measured), as this runs once per run of every page.
    let header = 0;
    for (let shift = 0; ; shift += 7) {
      if (pos >= end || shift > 28) throw new Error('a page ends inside its run-length data');
      const b = bytes[pos++];
      header += (b & 0x7f) * 2 ** shift;
      if (b < 0x80) break;
    }
    if (header % 2 === 1) {
      const total = (header - 1) * 4;
      const keep = Math.min(total, count - n);
      // The last run may stop after its last kept value (some writers truncate it).
      if (pos + Math.ceil((keep * width) / 8) > end) throw new Error('a page ends inside its bit-packed data');
      const next = pos + (total * width) / 8;
      let acc = 0;
      let bits = 0;
      for (let i = 0; i < keep; i++) {
        while (bits < width) {
          acc |= bytes[pos++] << bits;
          bits += 8;
        }
        out[n++] = acc & mask;
        acc >>>= width;
        bits -= width;
      }
      pos = next;
    } else {
      const run = header / 2;
      let value = 0;
      for (let i = 0; i < (width + 7) >> 3; i++) value |= bytes[pos++] << (8 * i);
      if (pos > end) throw new Error('a page ends inside its run-length data');
      out.fill(value, n, Math.min(count, n + run));
      n += run;
    }
  }
}

/** A page header (Parquet's PageHeader struct, the fields this path reads). */
interface PageHead {
  type: string;
  uncompressed: number;
  compressed: number;
  dictionary?: { values: number };
  v1?: { values: number; encoding: string };
  v2?: { values: number; encoding: string; definitionBytes: number; repetitionBytes: number; compressed: boolean };
}

/** parquet.thrift's PageType and Encoding values, by number (the ones this path names). */
const PAGE_TYPES = ['DATA_PAGE', 'INDEX_PAGE', 'DICTIONARY_PAGE', 'DATA_PAGE_V2'];
const ENCODINGS: Record<number, string> = { 0: 'PLAIN', 2: 'PLAIN_DICTIONARY', 3: 'RLE', 8: 'RLE_DICTIONARY', 9: 'BYTE_STREAM_SPLIT' };

function pageHeader(reader: { view: DataView; offset: number }): PageHead {
  const h = readStruct(reader);
  const int = (s: ThriftStruct | undefined, field: number) => (typeof s?.[field] === 'number' ? (s[field] as number) : 0);
  const struct = (field: number) => (typeof h[field] === 'object' ? (h[field] as ThriftStruct) : undefined);
  const encoding = (s: ThriftStruct, field: number) => ENCODINGS[int(s, field)] ?? `encoding ${int(s, field)}`;
  const v1 = struct(5);
  const dictionary = struct(7);
  const v2 = struct(8);
  return {
    type: PAGE_TYPES[int(h, 1)] ?? `page type ${int(h, 1)}`,
    uncompressed: int(h, 2),
    compressed: int(h, 3),
    dictionary: dictionary && { values: int(dictionary, 1) },
    v1: v1 && { values: int(v1, 1), encoding: encoding(v1, 2) },
    v2: v2 && {
      values: int(v2, 1),
      encoding: encoding(v2, 4),
      definitionBytes: int(v2, 5),
      repetitionBytes: int(v2, 6),
      compressed: v2[7] === undefined ? true : v2[7] === true,
    },
  };
}

interface Page {
  /** Values in the page, nulls included. */
  total: number;
  encoding: string;
  /** The definition levels (1 = present), when the column is optional. */
  defined?: Uint8Array;
  /** The page's value section, decompressed. */
  values: DataView;
}

const view = (bytes: Uint8Array) => new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);

/**
 * Decodes column `c` of every row group into `sink`, every cell written (NaN or '' where null),
 * and returns how many numbers are missing or outside the safe range (table/numeric.ts; 0 for
 * text). Throws NeedsGeneralReader for anything outside the fast path, and Error for a broken file.
 */
export function decodeColumn(
  file: Uint8Array,
  footer: ParquetFooter,
  c: number,
  sink: Sink,
  decompress: Decompress,
  scratch: Scratch,
): number {
  try {
    return decodeChunks(file, footer, c, sink, decompress, scratch);
  } catch (e) {
    // Every break names its column (the codec's and the run-length decoder's messages do not).
    const name = footer.schema[c + 1].name;
    if (e instanceof NeedsGeneralReader || !(e instanceof Error) || e.message.includes(`column ${name}`)) throw e;
    throw new Error(`column ${name}: ${e.message}`);
  }
}

function decodeChunks(file: Uint8Array, footer: ParquetFooter, c: number, sink: Sink, decompress: Decompress, scratch: Scratch): number {
  const leaf = footer.schema[c + 1];
  const type = leaf.type as ParquetType;
  const optional = leaf.repetition === 'OPTIONAL';
  let suspect = 0;
  const rows = footer.rows;
  let rowStart = 0;
  for (const group of footer.groups) {
    const chunk = group.chunks[c];
    if (!chunk || chunk.elsewhere || chunk.path.length !== 1 || chunk.path[0] !== leaf.name) throw new NeedsGeneralReader();
    const { start, codec } = chunk;
    const end = start + chunk.size;
    if (!(start >= 0 && end <= file.byteLength)) throw new Error(`column ${leaf.name} lies outside the file`);
    const reader = { view: new DataView(file.buffer, file.byteOffset + start, end - start), offset: 0 };
    const unpack = (bytes: Uint8Array, size: number) => (codec === 'UNCOMPRESSED' ? bytes : decompress(bytes, scratch.bytes(size), codec));
    let dictionary: Float64Array | string[] | undefined;
    let dictionaryBad: Uint8Array | undefined;
    let seen = 0;
    while (seen < group.rows) {
      if (reader.offset >= reader.view.byteLength) throw new Error(`column ${leaf.name} ends before its last value`);
      const header = pageHeader(reader);
      if (!(header.compressed >= 0 && reader.offset + header.compressed <= reader.view.byteLength))
        throw new Error(`a page of column ${leaf.name} runs past its column chunk`);
      const bytes = new Uint8Array(reader.view.buffer, reader.view.byteOffset + reader.offset, header.compressed);
      reader.offset += header.compressed;
      const size = header.uncompressed;
      if (header.type === 'DICTIONARY_PAGE') {
        const count = header.dictionary?.values ?? 0;
        const page = view(unpack(bytes, size));
        if ('texts' in sink) dictionary = plainTexts(page, count);
        else {
          dictionary = new Float64Array(count);
          plainNumbers(page, type, count, dictionary);
          dictionaryBad = outOfRange(dictionary);
        }
        continue;
      }
      let page: Page;
      if (header.type === 'DATA_PAGE' && header.v1) {
        const h = header.v1;
        const data = unpack(bytes, size);
        let offset = 0;
        let defined: Uint8Array | undefined;
        if (optional) {
          defined = scratch.u8(h.values);
          const length = view(data).getUint32(0, true);
          if (4 + length > data.byteLength) throw new Error('a page ends inside its definition levels');
          hybrid(data, 4, 4 + length, 1, defined, h.values);
          offset = 4 + length;
        }
        page = { total: h.values, encoding: h.encoding, defined, values: view(data.subarray(offset)) };
      } else if (header.type === 'DATA_PAGE_V2' && header.v2) {
        const h = header.v2;
        if (h.repetitionBytes) throw new NeedsGeneralReader();
        const levels = h.definitionBytes;
        let defined: Uint8Array | undefined;
        if (optional) {
          defined = scratch.u8(h.values);
          hybrid(bytes, 0, levels, 1, defined, h.values);
        }
        const rest = bytes.subarray(levels);
        page = { total: h.values, encoding: h.encoding, defined, values: view(h.compressed ? unpack(rest, size - levels) : rest) };
      } else throw new NeedsGeneralReader();
      if (rowStart + seen + page.total > rows) throw new Error(`column ${leaf.name} holds more values than the file has rows`);
      suspect += writePage(page, type, dictionary, dictionaryBad, sink, rowStart + seen, scratch);
      seen += page.total;
    }
    if (seen !== group.rows) throw new Error(`column ${leaf.name} holds ${seen} values in a row group of ${group.rows} rows`);
    rowStart += seen;
  }
  if (rowStart !== rows) throw new Error(`the row groups hold ${rowStart} rows, the file says ${rows}`);
  return suspect;
}

/** 1 for each dictionary entry outside the safe range (table/numeric.ts), else 0. */
function outOfRange(numbers: Float64Array): Uint8Array {
  const bad = new Uint8Array(numbers.length);
  for (let e = 0; e < numbers.length; e++) bad[e] = inSafeRange(numbers[e]) ? 0 : 1;
  return bad;
}

/** Dictionary indices of a page's present values (bit width in the first byte, then the hybrid). */
function indicesOf(page: Page, present: number, size: number, scratch: Scratch): Uint32Array {
  const bytes = new Uint8Array(page.values.buffer, page.values.byteOffset, page.values.byteLength);
  const indices = scratch.u32(present);
  if (present) hybrid(bytes, 1, bytes.length, bytes[0], indices, present);
  for (let i = 0; i < present; i++) if (indices[i] >= size) throw new Error('a dictionary index points past the dictionary');
  return indices;
}

/** Writes one data page's values from row `at`, nulls as NaN or ''. */
function writePage(
  page: Page,
  type: ParquetType,
  dictionary: Float64Array | string[] | undefined,
  /** For a number dictionary: 1 for each entry outside the safe range. */
  dictionaryBad: Uint8Array | undefined,
  sink: Sink,
  at: number,
  scratch: Scratch,
): number {
  const { defined, total } = page;
  let present = total;
  if (defined) {
    present = 0;
    for (let i = 0; i < total; i++) present += defined[i];
  }
  const dictionaryEncoded = page.encoding === 'RLE_DICTIONARY' || page.encoding === 'PLAIN_DICTIONARY';
  if (!dictionaryEncoded && page.encoding !== 'PLAIN') throw new NeedsGeneralReader();
  if (dictionaryEncoded && !dictionary) throw new Error('a dictionary-encoded page comes before its dictionary');
  if ('texts' in sink) {
    const { texts } = sink;
    if (dictionaryEncoded) {
      const words = dictionary as string[];
      const indices = indicesOf(page, present, words.length, scratch);
      if (!defined) for (let i = 0; i < total; i++) texts[at + i] = words[indices[i]];
      else for (let i = 0, k = 0; i < total; i++) texts[at + i] = defined[i] ? words[indices[k++]] : '';
      return 0;
    }
    const values = plainTexts(page.values, present);
    if (!defined) for (let i = 0; i < total; i++) texts[at + i] = values[i];
    else for (let i = 0, k = 0; i < total; i++) texts[at + i] = defined[i] ? values[k++] : '';
    return 0;
  }
  const { block, width, slot } = sink;
  let suspect = total - present;
  if (dictionaryEncoded) {
    // Each entry's range is checked once; a value then counts by its entry (one pass, no copy).
    const numbers = dictionary as Float64Array;
    const bad = dictionaryBad as Uint8Array;
    const indices = indicesOf(page, present, numbers.length, scratch);
    if (!defined)
      for (let i = 0, k = at * width + slot; i < total; i++, k += width) {
        const e = indices[i];
        block[k] = numbers[e];
        suspect += bad[e];
      }
    else
      for (let i = 0, j = 0, k = at * width + slot; i < total; i++, k += width) {
        if (!defined[i]) {
          block[k] = Number.NaN;
          continue;
        }
        const e = indices[j++];
        block[k] = numbers[e];
        suspect += bad[e];
      }
    return suspect;
  }
  const values = scratch.f64(present);
  plainNumbers(page.values, type, present, values);
  if (!defined)
    for (let i = 0, k = at * width + slot; i < total; i++, k += width) {
      const v = values[i];
      block[k] = v;
      if (!inSafeRange(v)) suspect++;
    }
  else
    for (let i = 0, j = 0, k = at * width + slot; i < total; i++, k += width) {
      if (!defined[i]) {
        block[k] = Number.NaN;
        continue;
      }
      const v = values[j++];
      block[k] = v;
      if (!inSafeRange(v)) suspect++;
    }
  return suspect;
}

/**
 * Decodes the numeric columns `cols` (column `cols[i]` into slot `slots[i]` of the row-major
 * block); returns those it gives back for the general reader, how many numbers are missing or
 * out of the safe range, and the first broken column it met (by its place in `cols`, so that two
 * threads agree on which one to report).
 * With `claim` (a counter shared by the threads of a two-thread read) each thread takes the next
 * column not yet taken, so neither waits for the other at the end, busy machine or not.
 * (Decoding eight columns side by side and then writing them row by row was tried: no faster.)
 */
export function decodeNumberColumns(
  file: Uint8Array,
  footer: ParquetFooter,
  cols: readonly number[],
  slots: readonly number[],
  block: Float64Array,
  width: number,
  decompress: Decompress,
  claim?: Int32Array,
): NumberColumnsDone {
  const scratch = new Scratch();
  const back: number[] = [];
  let suspect = 0;
  let broken: NumberColumnsDone['broken'];
  let own = 0;
  const next = () => (claim ? Atomics.add(claim, 0, 1) : own++);
  for (let i = next(); i < cols.length; i = next()) {
    try {
      suspect += decodeColumn(file, footer, cols[i], { block, width, slot: slots[i] }, decompress, scratch);
    } catch (e) {
      if (e instanceof NeedsGeneralReader) back.push(cols[i]);
      else if (!broken || i < broken.at) broken = { at: i, message: String((e as Error).message ?? e) };
    }
  }
  return { back, suspect, broken };
}

export interface NumberColumnsDone {
  back: number[];
  suspect: number;
  broken?: { at: number; message: string };
}
