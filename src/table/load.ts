/** Bytes of a delimited file → Table, choosing the separator from the declared format or the extension. */
import type { Problem } from '../problems/problem.js';
import { readDelimited } from './delimited.js';
import { buildTable, type DataRoles, type RolePaths, type TableResult } from './table.js';

export function delimiterFor(file: string, format?: 'csv' | 'tsv'): number {
  const f = format ?? (/\.(tsv|tab)$/i.test(file) ? 'tsv' : 'csv');
  return f === 'tsv' ? 0x09 : 0x2c;
}

export function tableFromBytes(bytes: Uint8Array, file: string, roles: DataRoles, format: 'csv' | 'tsv' | undefined, locate: (role: keyof RolePaths, index?: number) => Problem['position']): TableResult {
  const read = readDelimited(bytes, delimiterFor(file, format), file);
  if (!read.table) return { problems: read.problems };
  return buildTable(read.table, roles, file, locate);
}
