/** Bytes of a delimited file → Table, choosing the separator from the declared format or the extension. */
import type { Problem } from '../problems/problem.js';
import { delimitedGrid, readDelimited } from './delimited.js';
import { plainGrid, readPlain, type RowHelper } from './plain.js';
import { contentProblems } from './content-check.js';
import { buildTable, type DataRoles, type RolePaths, type TableResult } from './table.js';
import { hasErrors } from '../problems/problem.js';
import { filteredGrid, joinedGrid, relabeledGrid, transposedGrid } from './layout.js';
import type { Grid } from './grid.js';
import { columnsGrid, type ColumnTable } from './columns.js';
import { describe, type Described } from './covariates.js';

import { delimiterFor } from './delimiter.js';

export { delimiterFor };

export function tableFromBytes(
  bytes: Uint8Array,
  file: string,
  roles: DataRoles,
  format: 'csv' | 'tsv' | undefined,
  locate: (role: keyof RolePaths, index?: number) => Problem['position'],
  helper?: RowHelper,
): TableResult & { described?: Described } {
  const delimiter = delimiterFor(file, format);
  const content = contentProblems(bytes, file);
  if (content.length) return { problems: content };
  // Quote-free files (nearly every large numeric table) take the one-pass reader; the full
  // reader handles everything else and reports malformed files where they go wrong.
  const plain = readPlain(bytes, delimiter);
  if (plain) {
    const grid = plainGrid(plain, helper);
    const built = buildTable(grid, roles, file, locate);
    if (!built.ragged) return withDescription(built, grid, roles, file);
  }
  const read = readDelimited(bytes, delimiter, file);
  if (!read.table) return { problems: read.problems };
  const grid = delimitedGrid(read.table);
  return withDescription(buildTable(grid, roles, file, locate), grid, roles, file);
}

function withDescription(built: TableResult, grid: Grid, roles: DataRoles, file: string): TableResult & { described?: Described } {
  return roles.keepOtherColumns && built.table ? { ...built, described: describe(grid, built.table, roles, file) } : built;
}

export interface SheetInput {
  /** The sample sheet's bytes, or its decoded columns (Parquet). */
  bytes: Uint8Array | ColumnTable;
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

/** Rows before and after data.where. */
export interface FilterCounts {
  before: number;
  after: number;
}

function gridOf(bytes: Uint8Array | ColumnTable, file: string, format: 'csv' | 'tsv' | undefined): { grid?: Grid; problems: Problem[] } {
  if (!(bytes instanceof Uint8Array)) return { grid: columnsGrid(bytes), problems: [] };
  const content = contentProblems(bytes, file);
  if (content.length) return { problems: content };
  const read = readDelimited(bytes, delimiterFor(file, format), file);
  return read.table ? { grid: delimitedGrid(read.table), problems: read.problems } : { problems: read.problems };
}

/**
 * A data file in either layout (its bytes, or a columnar file already decoded), joined to a
 * sample sheet when there is one → Table. Features come
 * only from the data file; the label and group from the sample sheet when it is given.
 */
export function tableFromLayout(
  bytes: Uint8Array | ColumnTable,
  file: string,
  roles: DataRoles,
  format: 'csv' | 'tsv' | undefined,
  layout: 'samples-in-rows' | 'features-in-rows',
  sheet: SheetInput | undefined,
  locate: (role: keyof RolePaths, index?: number) => Problem['position'],
  whereAt: (column: string) => Partial<Problem> = () => ({}),
): TableResult & { joined?: JoinCounts; filtered?: FilterCounts; described?: Described } {
  const matrix = gridOf(bytes, file, format);
  if (!matrix.grid) return { problems: matrix.problems };
  let grid = layout === 'features-in-rows' ? transposedGrid(matrix.grid, roles.id ?? 'id') : matrix.grid;
  const problems = [...matrix.problems];
  const whereCols = Object.keys(roles.where ?? {});
  let joined: JoinCounts | undefined;
  let sheetOnly: string[] | undefined;
  if (sheet) {
    const s = gridOf(sheet.bytes, sheet.file, sheet.format);
    problems.push(...s.problems);
    if (!s.grid) return { problems };
    // Carried from the sheet: the label and group, the columns a filter reads, and sheet columns listed as features.
    const fromSheet = (name: string) => s.grid!.header.includes(name) && !grid.header.includes(name);
    const carry = [
      ...new Set([
        ...(roles.keepOtherColumns ? s.grid.header.filter((n) => n !== roles.id && fromSheet(n)) : []),
        roles.label,
        ...(roles.group ? [roles.group] : []),
        ...whereCols.filter(fromSheet),
        ...(Array.isArray(roles.features) ? roles.features.filter(fromSheet) : []),
      ]),
    ];
    const j = joinedGrid(grid, s.grid, {
      id: roles.id!,
      carry,
      unmatched: sheet.unmatched,
      matrixFile: file,
      sheetFile: sheet.file,
      at: sheet.at,
    });
    problems.push(...j.problems);
    if (!j.grid || hasErrors(j.problems)) return { problems };
    sheetOnly = carry.filter(
      (n) => n !== roles.label && n !== roles.group && !(Array.isArray(roles.features) && roles.features.includes(n)),
    );
    grid = j.grid;
    joined = { 'data-only': j.matrixOnly.length, 'sheet-only': j.sheetOnly.length };
  }
  let filtered: FilterCounts | undefined;
  if (roles.where) {
    const f = filteredGrid(grid, roles.where, whereAt);
    problems.push(...f.problems);
    if (!f.grid || hasErrors(f.problems)) return { problems };
    grid = f.grid;
    filtered = { before: f.before, after: f.after };
  }
  if (roles.classes) {
    const labelCol = grid.header.indexOf(roles.label);
    if (labelCol >= 0) {
      const r = relabeledGrid(grid, labelCol, roles.classes, file, new Set(roles.missing));
      problems.push(...r.problems);
      grid = r.grid;
    }
  }
  // The columns a filter reads describe the rows, as do the sample sheet's: they are not features unless listed.
  const describing = [...whereCols, ...(sheetOnly ?? [])];
  const featureRoles: DataRoles =
    describing.length && !Array.isArray(roles.features)
      ? { ...roles, features: { exclude: [...new Set([...(roles.features?.exclude ?? []), ...describing])] } }
      : roles;
  const built = buildTable(grid, featureRoles, file, locate);
  return { ...withDescription(built, grid, roles, file), problems: [...problems, ...built.problems], joined, filtered };
}
