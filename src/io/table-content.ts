/**
 * A table file's bytes as foldseal reads them: gzip decompressed (decompress.ts), Parquet decoded
 * (parquet.ts, a large one partly on `twin`, the row thread).
 */
import type { Problem } from '../problems/problem.js';
import type { ColumnTable } from '../table/columns.js';
import { decompressed } from './decompress.js';
import type { ParquetTwin } from './parquet.js';
import { isParquet } from './parquet-magic.js';

export async function tableContent(
  bytes: Uint8Array,
  shownAs: string,
  where: Partial<Problem> = {},
  twin?: ParquetTwin,
): Promise<{ content: Uint8Array | ColumnTable; problem?: undefined } | { problem: Problem }> {
  const text = decompressed(bytes, shownAs, where);
  if (text.problem) return text;
  if (!isParquet(text.bytes)) return { content: text.bytes };
  // The decoder's modules load only for a Parquet file.
  const { readParquet } = await import('./parquet.js');
  const pq = await readParquet(text.bytes, shownAs, where, twin);
  return pq.problem ? pq : { content: pq.table };
}
