/** Bytes of a delimited file → Table, choosing the separator from the declared format or the extension. */
import type { Problem } from '../problems/problem.js';
import { delimitedGrid, readDelimited } from './delimited.js';
import { plainGrid, readPlain, type RowHelper } from './plain.js';
import { contentProblems } from './content-check.js';
import { buildTable, type DataRoles, type RolePaths, type TableResult } from './table.js';

export function delimiterFor(file: string, format?: 'csv' | 'tsv'): number {
  const f = format ?? (/\.(tsv|tab)$/i.test(file) ? 'tsv' : 'csv');
  return f === 'tsv' ? 0x09 : 0x2c;
}

export function tableFromBytes(
  bytes: Uint8Array,
  file: string,
  roles: DataRoles,
  format: 'csv' | 'tsv' | undefined,
  locate: (role: keyof RolePaths, index?: number) => Problem['position'],
  helper?: RowHelper,
): TableResult {
  const delimiter = delimiterFor(file, format);
  const content = contentProblems(bytes, file);
  if (content.length) return { problems: content };
  // Quote-free files (nearly every large numeric table) take the one-pass reader; the full
  // reader handles everything else and reports malformed files where they go wrong.
  const plain = readPlain(bytes, delimiter);
  if (plain) {
    const built = buildTable(plainGrid(plain, helper), roles, file, locate);
    if (!built.ragged) return built;
  }
  const read = readDelimited(bytes, delimiter, file);
  if (!read.table) return { problems: read.problems };
  return buildTable(delimitedGrid(read.table), roles, file, locate);
}
