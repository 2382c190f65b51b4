/**
 * A Parquet file's footer (FileMetaData in the Parquet format's parquet.thrift), read with the
 * compact-protocol reader: the schema's elements, the row count and, per row group, where each
 * column chunk lies and how it is compressed. Only what foldseal's reader uses is kept; the
 * rest (statistics, key-value metadata, indexes) is skipped. Pure: bytes in, a Footer out, or an
 * Error whose message says what is wrong.
 */
import { readStruct, type ThriftStruct, type ThriftValue } from './thrift-compact.js';

/** Physical types, in the order of parquet.thrift's Type enum. */
const TYPES = ['BOOLEAN', 'INT32', 'INT64', 'INT96', 'FLOAT', 'DOUBLE', 'BYTE_ARRAY', 'FIXED_LEN_BYTE_ARRAY'] as const;
export type ParquetType = (typeof TYPES)[number];

/** Compression codecs, in the order of parquet.thrift's CompressionCodec enum. */
const CODECS = ['UNCOMPRESSED', 'SNAPPY', 'GZIP', 'LZO', 'BROTLI', 'LZ4', 'ZSTD', 'LZ4_RAW'] as const;
export type Codec = (typeof CODECS)[number];

const REPETITIONS = ['REQUIRED', 'OPTIONAL', 'REPEATED'] as const;

/** One element of the flattened schema tree (the root first, then its descendants depth first). */
export interface SchemaNode {
  name: string;
  /** Absent on groups. */
  type?: ParquetType;
  repetition?: (typeof REPETITIONS)[number];
  children: number;
  /** The legacy annotation: 'UTF8' for text, otherwise "converted type N". */
  converted?: string;
  /** The annotation: 'STRING' for text, otherwise "logical type N" (N = the union's field). */
  logical?: string;
}

/** Where one column chunk's pages lie. */
export interface ChunkPlace {
  path: string[];
  codec: Codec;
  /** The chunk lives in another file (ColumnChunk.file_path): not read. */
  elsewhere: boolean;
  /** Byte offset of its first page (the dictionary page when there is one) and its compressed length. */
  start: number;
  size: number;
}

export interface ParquetFooter {
  rows: number;
  schema: SchemaNode[];
  groups: { rows: number; chunks: ChunkPlace[] }[];
}

const FOOTER = 'the footer';

/** Reads the footer of a file that starts and ends with "PAR1" (isParquet in parquet.ts). */
export function readFooter(file: Uint8Array): ParquetFooter {
  const n = file.byteLength;
  const length = n >= 12 ? new DataView(file.buffer, file.byteOffset + n - 8, 4).getUint32(0, true) : -1;
  if (!(length > 0 && length <= n - 12)) throw new Error(`${FOOTER} length (${length} bytes) does not fit the file's ${n} bytes`);
  const view = new DataView(file.buffer, file.byteOffset + n - 8 - length, length);
  const meta = readStruct({ view, offset: 0 }, true, FOOTER);
  const schema = list(meta, 2, 'schema').map(schemaNode);
  if (!schema.length) throw new Error(`${FOOTER} holds no schema`);
  const rows = count(meta, 3, 'the row count');
  const groups = list(meta, 4, 'row groups').map((g) => ({
    rows: count(g, 3, "a row group's row count"),
    chunks: list(g, 1, "a row group's columns").map(chunkPlace),
  }));
  return { rows, schema, groups };
}

function schemaNode(s: ThriftStruct): SchemaNode {
  const name = s[4];
  if (typeof name !== 'string') throw new Error(`${FOOTER} has a schema element without a name`);
  const logical = s[10];
  const converted = s[6];
  return {
    name,
    type: s[1] === undefined ? undefined : named(TYPES, s[1], 'type'),
    repetition: s[3] === undefined ? undefined : named(REPETITIONS, s[3], 'repetition'),
    children: s[5] === undefined ? 0 : count(s, 5, 'a child count'),
    converted: converted === undefined ? undefined : converted === 0 ? 'UTF8' : `converted type ${String(converted)}`,
    logical: logical === undefined ? undefined : unionField(logical),
  };
}

/** A LogicalType union names its kind by the one field it sets: 1 is STRING. */
function unionField(v: ThriftValue): string {
  const fields = typeof v === 'object' && !Array.isArray(v) && !(v instanceof Map) ? Object.keys(v) : [];
  return fields.length === 1 && fields[0] === '1' ? 'STRING' : `logical type ${fields.join('+') || '?'}`;
}

function chunkPlace(c: ThriftStruct): ChunkPlace {
  const m = c[3];
  if (typeof m !== 'object' || Array.isArray(m) || m instanceof Map) throw new Error(`${FOOTER} has a column chunk without its metadata`);
  const path = m[3];
  if (!Array.isArray(path) || !path.every((p): p is string => typeof p === 'string'))
    throw new Error(`${FOOTER} has a column chunk without a valid path`);
  const data = count(m, 9, 'a data page offset');
  const dictionary = m[11] === undefined ? 0 : count(m, 11, 'a dictionary page offset');
  return {
    path,
    codec: named(CODECS, m[4], 'codec'),
    elsewhere: c[1] !== undefined,
    // Offset 0 is the file's magic: a writer that sets it for "no dictionary" means the data page.
    start: dictionary > 0 ? dictionary : data,
    size: count(m, 7, 'a compressed size'),
  };
}

function list(s: ThriftStruct, field: number, what: string): ThriftStruct[] {
  const v = s[field];
  if (!Array.isArray(v)) throw new Error(`${FOOTER} lacks ${what}`);
  for (const e of v) if (typeof e !== 'object' || Array.isArray(e) || e instanceof Map) throw new Error(`${FOOTER} has broken ${what}`);
  return v as ThriftStruct[];
}

function count(s: ThriftStruct, field: number, what: string): number {
  const v = s[field];
  if (typeof v !== 'number' || !Number.isSafeInteger(v) || v < 0) throw new Error(`${FOOTER} has no valid ${what}`);
  return v;
}

function named<T extends string>(names: readonly T[], v: ThriftValue | undefined, what: string): T {
  const name = typeof v === 'number' ? names[v] : undefined;
  if (name === undefined) throw new Error(`${FOOTER} names an unknown ${what} (${String(v)})`);
  return name;
}
