/**
 * Rows to predict: an id column and the training features matched by name (extra columns are
 * ignored), in either layout. Only the features some fold model reads must be present; the
 * others, when absent, are never read. A label column, when present, is kept for scoring.
 */
import { error, warning, type Problem } from '../problems/problem.js';
import { delimitedGrid, readDelimited } from './delimited.js';
import { cellAt, type Grid } from './grid.js';
import { transposedGrid } from './layout.js';
import { columnsGrid, type ColumnTable } from './columns.js';
import { delimiterFor } from './load.js';
import { contentProblems } from './content-check.js';
import type { Matrix } from './matrix.js';
import { numberProblems } from './numeric.js';

export interface NewRows {
  ids: string[];
  X: Matrix;
  ignoredColumns: string[];
  /** Line in the file where each row starts (for messages). */
  lines: Int32Array;
  /** Features the file does not have (no fold model reads them; their cells are NaN). */
  absent?: string[];
  /** The label of each row, when the file has the label column. */
  labels?: string[];
}

export interface NewRowsOptions {
  /** Columns the protocol accounts for (label, group, exclusions): ignored without a warning. */
  known?: readonly string[];
  /** 1 for each feature some model reads; absent features with 0 are allowed. Default: every feature is needed. */
  needed?: Uint8Array;
  layout?: 'samples-in-rows' | 'features-in-rows';
  /** The label column, kept when the file has it. */
  label?: string;
}

/** `bytes`: a delimited file's bytes, or a columnar file already decoded (Parquet). */
export function newRowsFromBytes(
  bytes: Uint8Array | ColumnTable,
  file: string,
  features: readonly string[],
  idColumn: string | undefined,
  missing: readonly string[],
  options: NewRowsOptions = {},
): { rows?: NewRows; problems: Problem[] } {
  let grid: Grid;
  if (bytes instanceof Uint8Array) {
    const content = contentProblems(bytes, file);
    if (content.length) return { problems: content };
    const read = readDelimited(bytes, delimiterFor(file), file);
    if (!read.table) return { problems: read.problems };
    grid = delimitedGrid(read.table);
  } else grid = columnsGrid(bytes);
  const t: Grid = options.layout === 'features-in-rows' ? transposedGrid(grid, idColumn ?? 'id') : grid;
  const problems: Problem[] = [];
  const at = (line = 1, col = 1) => ({ file, position: { line, col } });
  if (t.rows === 0) return { problems: [error('data-no-rows', 'the new-rows file has a header but no data rows', at())] };
  const index = new Map(t.header.map((h, i) => [h, i]));
  const idCol = idColumn === undefined ? undefined : index.get(idColumn);
  if (idColumn !== undefined && idCol === undefined)
    problems.push(error('new-rows-missing-id', `the id column "${idColumn}" is not in the new-rows file's header`, at()));
  const cols = features.map((f) => index.get(f));
  const absent: string[] = [];
  features.forEach((f, j) => {
    if (cols[j] !== undefined) return;
    if (options.needed && !options.needed[j]) absent.push(f);
    else problems.push(error('new-rows-missing-feature', `feature "${f}" is not in the new-rows file's header`, at()));
  });
  if (problems.length) return { problems };
  const labelCol = options.label === undefined ? undefined : index.get(options.label);
  const used = new Set([idCol, labelCol, ...cols]);
  const ignoredColumns = t.header.filter((_, i) => !used.has(i));
  const unexpected = ignoredColumns.filter((c) => !(options.known ?? []).includes(c));
  if (unexpected.length)
    problems.push(warning('new-rows-extra-columns', `columns not used for prediction: ${unexpected.join(', ')}`, at()));
  const present = cols.filter((c): c is number => c !== undefined);
  const textCols = [idCol, labelCol].filter((c): c is number => c !== undefined);
  const extracted = t.extract(present, textCols)!;
  const ids = idCol === undefined ? Array.from({ length: t.rows }, (_, r) => String(r + 1)) : extracted.texts[0];
  const seen = new Map<string, number>();
  ids.forEach((id, r) => {
    if (id === '') problems.push(error('data-empty-id', `row ${r + 1} has an empty id`, cellAt(t, r, idCol!, file)));
    else if (seen.has(id))
      problems.push(
        error('data-duplicate-id', `id "${id}" appears again (first on line ${t.rowLine[seen.get(id)!]})`, cellAt(t, r, idCol!, file)),
      );
    else seen.set(id, r);
  });
  problems.push(...numberProblems(t, extracted, present, new Set(missing), file));
  if (problems.some((p) => p.severity === 'error')) return { problems };
  // Present features in their cells; absent ones stay NaN (no model reads them).
  let data = extracted.numbers;
  if (absent.length) {
    const width = present.length;
    data = new Float64Array(t.rows * features.length).fill(Number.NaN);
    let k = 0;
    features.forEach((_, j) => {
      if (cols[j] === undefined) return;
      for (let r = 0; r < t.rows; r++) data[r * features.length + j] = extracted.numbers[r * width + k];
      k++;
    });
  }
  const rows: NewRows = { ids, X: { rows: t.rows, cols: features.length, data }, ignoredColumns, lines: t.rowLine.slice(0, t.rows) };
  if (absent.length) rows.absent = absent;
  if (labelCol !== undefined) rows.labels = extracted.texts[textCols.indexOf(labelCol)];
  return { rows, problems };
}
