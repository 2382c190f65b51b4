/** Bytes of a delimited file → Table, choosing the separator from the declared format or the extension. */
import type { Problem } from '../problems/problem.js';
import { delimitedGrid, readDelimited } from './delimited.js';
import { plainGrid, readPlain, type RowHelper } from './plain.js';
import { contentProblems } from './content-check.js';
import { buildTable, type DataRoles, type RolePaths, type TableResult } from './table.js';
import { hasErrors } from '../problems/problem.js';
import { joinedGrid, transposedGrid } from './layout.js';
import type { Grid } from './grid.js';

export function delimiterFor(file: string, format?: 'csv' | 'tsv'): number {
  const f = format ?? (/\.(tsv|tab)(\.gz)?$/i.test(file) ? 'tsv' : 'csv');
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

export interface SheetInput {
  bytes: Uint8Array;
  file: string;
  format?: 'csv' | 'tsv';
  unmatched: 'error' | 'drop';
  /** Where the protocol declares the sample sheet. */
  at: Partial<Problem>;
}

/** How many samples a join left out (unmatched: drop), for the results. */
export interface JoinCounts {
  'data-only': number;
  'sheet-only': number;
}

function gridOf(bytes: Uint8Array, file: string, format: 'csv' | 'tsv' | undefined): { grid?: Grid; problems: Problem[] } {
  const content = contentProblems(bytes, file);
  if (content.length) return { problems: content };
  const read = readDelimited(bytes, delimiterFor(file, format), file);
  return read.table ? { grid: delimitedGrid(read.table), problems: read.problems } : { problems: read.problems };
}

/**
 * A data file in either layout, joined to a sample sheet when there is one → Table. Features come
 * only from the data file; the label and group from the sample sheet when it is given.
 */
export function tableFromLayout(
  bytes: Uint8Array,
  file: string,
  roles: DataRoles,
  format: 'csv' | 'tsv' | undefined,
  layout: 'samples-in-rows' | 'features-in-rows',
  sheet: SheetInput | undefined,
  locate: (role: keyof RolePaths, index?: number) => Problem['position'],
): TableResult & { joined?: JoinCounts } {
  const matrix = gridOf(bytes, file, format);
  if (!matrix.grid) return { problems: matrix.problems };
  let grid = layout === 'features-in-rows' ? transposedGrid(matrix.grid, roles.id ?? 'id') : matrix.grid;
  const problems = [...matrix.problems];
  let joined: JoinCounts | undefined;
  if (sheet) {
    const s = gridOf(sheet.bytes, sheet.file, sheet.format);
    problems.push(...s.problems);
    if (!s.grid) return { problems };
    const j = joinedGrid(grid, s.grid, {
      id: roles.id!,
      carry: [roles.label, ...(roles.group ? [roles.group] : [])],
      unmatched: sheet.unmatched,
      matrixFile: file,
      sheetFile: sheet.file,
      at: sheet.at,
    });
    problems.push(...j.problems);
    if (!j.grid || hasErrors(j.problems)) return { problems };
    grid = j.grid;
    joined = { 'data-only': j.matrixOnly.length, 'sheet-only': j.sheetOnly.length };
  }
  const built = buildTable(grid, roles, file, locate);
  return { ...built, problems: [...problems, ...built.problems], joined };
}
