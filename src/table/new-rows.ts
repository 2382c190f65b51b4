/** Rows to predict: an id column and the training features matched by name (extra columns are ignored). */
import { error, warning, type Problem } from '../problems/problem.js';
import { cellPosition, delimitedGrid, readDelimited, textColumn } from './delimited.js';
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
}

/** `known` names columns the protocol already accounts for (label, group, exclusions): ignored without a warning. */
export function newRowsFromBytes(
  bytes: Uint8Array,
  file: string,
  features: readonly string[],
  idColumn: string | undefined,
  missing: readonly string[],
  known: readonly string[] = [],
): { rows?: NewRows; problems: Problem[] } {
  const content = contentProblems(bytes, file);
  if (content.length) return { problems: content };
  const read = readDelimited(bytes, delimiterFor(file), file);
  if (!read.table) return { problems: read.problems };
  const t = read.table;
  const problems: Problem[] = [];
  const at = (line = 1, col = 1) => ({ file, position: { line, col } });
  if (t.rows === 0) return { problems: [error('data-no-rows', 'the new-rows file has a header but no data rows', at())] };
  const index = new Map(t.header.map((h, i) => [h, i]));
  const idCol = idColumn === undefined ? undefined : index.get(idColumn);
  if (idColumn !== undefined && idCol === undefined)
    problems.push(error('new-rows-missing-id', `the id column "${idColumn}" is not in the new-rows file's header`, at()));
  const cols = features.map((f) => index.get(f));
  features.forEach((f, j) => {
    if (cols[j] === undefined)
      problems.push(error('new-rows-missing-feature', `feature "${f}" is not in the new-rows file's header`, at()));
  });
  if (problems.length) return { problems };
  const used = new Set([idCol, ...cols]);
  const ignoredColumns = t.header.filter((_, i) => !used.has(i));
  const unexpected = ignoredColumns.filter((c) => !known.includes(c));
  if (unexpected.length)
    problems.push(warning('new-rows-extra-columns', `columns not used for prediction: ${unexpected.join(', ')}`, at()));
  const ids = idCol === undefined ? Array.from({ length: t.rows }, (_, r) => String(r + 1)) : textColumn(t, idCol);
  const seen = new Map<string, number>();
  ids.forEach((id, r) => {
    if (id === '') problems.push(error('data-empty-id', `row ${r + 1} has an empty id`, { file, position: cellPosition(t, r, idCol!) }));
    else if (seen.has(id))
      problems.push(
        error('data-duplicate-id', `id "${id}" appears again (first on line ${t.rowLine[seen.get(id)!]})`, {
          file,
          position: cellPosition(t, r, idCol!),
        }),
      );
    else seen.set(id, r);
  });
  const grid = delimitedGrid(t);
  const extracted = grid.extract(cols as number[], [])!;
  problems.push(...numberProblems(grid, extracted, cols as number[], new Set(missing), file));
  const data = extracted.numbers;
  if (problems.some((p) => p.severity === 'error')) return { problems };
  return { rows: { ids, X: { rows: t.rows, cols: features.length, data }, ignoredColumns, lines: t.rowLine.slice(0, t.rows) }, problems };
}
