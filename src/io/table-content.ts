/** A table file's bytes as foldseal reads them: gzip decompressed (decompress.ts), Parquet decoded (parquet.ts). */
import type { Problem } from '../problems/problem.js';
import type { ColumnTable } from '../table/columns.js';
import { decompressed } from './decompress.js';
import { isParquet, readParquet } from './parquet.js';

export async function tableContent(
  bytes: Uint8Array,
  shownAs: string,
  where: Partial<Problem> = {},
): Promise<{ content: Uint8Array | ColumnTable; problem?: undefined } | { problem: Problem }> {
  const text = decompressed(bytes, shownAs, where);
  if (text.problem) return text;
  if (!isParquet(text.bytes)) return { content: text.bytes };
  const pq = await readParquet(text.bytes, shownAs, where);
  return pq.problem ? pq : { content: pq.table };
}
