/**
 * Parquet files (the columnar format applied ML teams keep feature tables in), read through
 * hyparquet: numeric columns straight into Float64Arrays, others as text. Recognized by their
 * magic bytes ("PAR1" at both ends), whatever their name. gzip and Brotli pages are decompressed
 * with node:zlib; snappy is hyparquet's own; other codecs are reported.
 */
import { brotliDecompressSync, gunzipSync } from 'node:zlib';
import type { FileMetaData } from 'hyparquet';
import { error, type Problem } from '../problems/problem.js';
import type { ColumnTable } from '../table/columns.js';

export function isParquet(bytes: Uint8Array): boolean {
  const n = bytes.length;
  const par1 = (i: number) => bytes[i] === 0x50 && bytes[i + 1] === 0x41 && bytes[i + 2] === 0x52 && bytes[i + 3] === 0x31;
  return n >= 12 && par1(0) && par1(n - 4);
}

const compressors = {
  GZIP: (input: Uint8Array) => new Uint8Array(gunzipSync(input)),
  BROTLI: (input: Uint8Array) => new Uint8Array(brotliDecompressSync(input)),
};

const NUMERIC = new Set(['DOUBLE', 'FLOAT', 'INT32', 'INT64']);

export async function readParquet(
  bytes: Uint8Array,
  shownAs: string,
  where: Partial<Problem> = {},
): Promise<{ table: ColumnTable; problem?: undefined } | { problem: Problem }> {
  const fail = (why: string, hint?: string) => ({
    problem: error('data-bad-parquet', `file ${shownAs} is a Parquet file foldseal cannot read: ${why}`, { ...where, hint }),
  });
  // hyparquet reads an ArrayBuffer (a large file arrives in shared memory for the row thread: copied).
  const file =
    bytes.buffer instanceof ArrayBuffer
      ? bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength)
      : Uint8Array.from(bytes).buffer;
  // Loaded only for a Parquet file: the library costs every other run ~45 ms of start-up.
  const { parquetMetadata } = await import('hyparquet');
  let metadata: FileMetaData;
  try {
    metadata = parquetMetadata(file);
  } catch (e) {
    return fail((e as Error).message);
  }
  const root = metadata.schema[0];
  const leaves = metadata.schema.slice(1);
  if (leaves.length !== (root.num_children ?? 0) || leaves.some((s) => s.num_children))
    return fail('it has nested columns', 'write a flat table: one column per feature');
  const rows = Number(metadata.num_rows);
  const names = leaves.map((s) => s.name);
  const numeric = leaves.map((s) => NUMERIC.has(s.type ?? '') && !s.logical_type && !s.converted_type);
  // Decoding half of the columns on a second thread was tried: on this project's 2-core machine it
  // gained nothing (the second core adds little here; see the README, Performance).
  let columns: (Float64Array | string[])[];
  try {
    columns = await decodeColumns(file, metadata, names, numeric);
  } catch (e) {
    const message = (e as Error).message;
    return fail(message, /compress|codec/i.test(message) ? 'write it with snappy, gzip, Brotli or no compression' : undefined);
  }
  return { table: { names, rows, columns } };
}

/** The named columns of a Parquet file: numeric ones as Float64Array (NaN where null), others as text. */
async function decodeColumns(
  file: ArrayBuffer,
  metadata: FileMetaData,
  names: string[],
  numeric: boolean[],
): Promise<(Float64Array | string[])[]> {
  const rows = Number(metadata.num_rows);
  const columns: (Float64Array | string[])[] = names.map((_, c) =>
    numeric[c] ? new Float64Array(rows).fill(Number.NaN) : new Array<string>(rows).fill(''),
  );
  if (!names.length) return columns;
  const { parquetRead } = await import('hyparquet');
  await parquetRead({
    file,
    metadata,
    columns: names,
    compressors,
    onChunk: ({ columnName, columnData, rowStart }) => {
      const out = columns[names.indexOf(columnName)];
      // A required double column arrives as a Float64Array: one copy.
      if (out instanceof Float64Array && columnData instanceof Float64Array) {
        out.set(columnData, rowStart);
        return;
      }
      for (let i = 0; i < columnData.length; i++) {
        const v = columnData[i] as unknown;
        if (v === null || v === undefined) continue;
        if (out instanceof Float64Array) out[rowStart + i] = typeof v === 'bigint' ? Number(v) : (v as number);
        else out[rowStart + i] = typeof v === 'string' ? v : String(v);
      }
    },
  });
  return columns;
}
