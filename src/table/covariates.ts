/**
 * The columns that describe rows without being features: a sample sheet's covariates (batch,
 * site, patient, …), and the data file's text or excluded columns. Kept only when asked
 * (DataRoles.keepOtherColumns, for the leakage audit): a run does not pay for them. Pure.
 */
import type { Grid } from './grid.js';
import type { Table } from './table.js';

export interface Covariate {
  name: string;
  /** Every row's cell as text, in the table's row order. */
  values: string[];
  /** Where the column's first data cell is. */
  at: { line: number; col: number; file: string };
}

/** What the audit needs from a read table besides the Table itself. */
export interface Described {
  covariates: Covariate[];
  /** Position of a feature's cell (row in table order, feature index) for located findings. */
  featureCell(row: number, feature: number): { line: number; col: number; file: string };
}

/** `file`: the data file as shown, for cells the grid does not place in another file. */
function placed(p: { line: number; col: number; file?: string }, file: string) {
  return { line: p.line, col: p.col, file: p.file ?? file };
}

export function describe(grid: Grid, table: Table, roles: { id?: string; label: string; group?: string }, file: string): Described {
  const taken = new Set([roles.id, roles.label, roles.group, ...table.featureNames].filter((n): n is string => n !== undefined));
  // The first column of each name (a wide matrix has tens of thousands: no indexOf per column).
  const firstOf = new Map<string, number>();
  grid.header.forEach((name, c) => {
    if (!firstOf.has(name)) firstOf.set(name, c);
  });
  const covariates: Covariate[] = [];
  grid.header.forEach((name, c) => {
    if (taken.has(name) || firstOf.get(name) !== c) return;
    covariates.push({
      name,
      values: Array.from({ length: grid.rows }, (_, r) => grid.text(r, c)),
      at: placed(grid.position(0, c), file),
    });
  });
  const featureCol = table.featureNames.map((n) => firstOf.get(n)!);
  return { covariates, featureCell: (row, feature) => placed(grid.position(row, featureCol[feature]), file) };
}
