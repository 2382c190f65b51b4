/**
 * Turns a delimited file into the typed table every later step uses:
 * ids and labels as strings, label codes as Int32Array, features as a row-major Matrix.
 */
import { error, warning, type Problem } from '../problems/problem.js';
import { idOrder } from '../util/id-order.js';
import { compareUtf8 } from '../util/bytes.js';
import { cellAt, type Grid } from './grid.js';
import type { Matrix } from './matrix.js';
import { numberProblems } from './numeric.js';

export interface DataRoles {
  id?: string;
  label: string;
  group?: string;
  /** Explicit feature list, or columns to leave out of the default (every numeric column). */
  features?: string[] | { exclude: string[] };
  missing: string[];
  /** Keep only rows whose cell in each column is one of the listed values (data.where). */
  where?: Record<string, string[]>;
  /** Classes as lists of label values (data.classes). */
  classes?: Record<string, string[]>;
  /** Carry every sample-sheet column and describe the non-feature columns (the leakage audit asks; a run does not). */
  keepOtherColumns?: boolean;
}

export interface Table {
  /** Row ids as given (or 1-based row numbers when the protocol names no id column). */
  ids: string[];
  labels: string[];
  /** Distinct label values in UTF-8 byte order; y[r] indexes into it. */
  classes: string[];
  y: Int32Array;
  groups?: string[];
  featureNames: string[];
  X: Matrix;
  /** Line in the file where each data row starts (for messages). */
  rowLines: Int32Array;
  /** Text columns that the default feature rule left out. */
  ignoredColumns: string[];
  /** Whether any feature cell is missing (NaN); false lets checks skip scanning X. Absent: unknown. */
  hasMissing?: boolean;
}

export type RolePaths = Partial<Record<'id' | 'label' | 'group' | 'features', (string | number)[]>>;

export interface TableResult {
  table?: Table;
  problems: Problem[];
  /** The grid's rows turned out ragged (only the fast reader finds this late): read the file with the full reader. */
  ragged?: true;
}

const MAX_CELL_PROBLEMS = 1000;
// biome-ignore lint/suspicious/noControlCharactersInRegex: the whole ASCII range, control characters included, is meant
const ASCII = /^[\x00-\x7f]*$/;

export function buildTable(
  t: Grid,
  roles: DataRoles,
  file: string,
  locate: (role: keyof RolePaths, index?: number) => Problem['position'],
): TableResult {
  const problems: Problem[] = [];
  const columnIndex = new Map<string, number>();
  t.header.forEach((h, i) => {
    if (!columnIndex.has(h)) columnIndex.set(h, i);
  });
  const duplicated = new Set(t.header.filter((h, i) => columnIndex.get(h) !== i));
  for (const d of duplicated)
    problems.push(
      error('data-duplicate-column', `column "${d}" appears more than once in the header`, { file, position: { line: 1, col: 1 } }),
    );
  if (t.rows === 0) {
    problems.push(error('data-no-rows', 'the data file has a header but no data rows', { file, position: { line: 1, col: 1 } }));
    return { problems };
  }
  const need = (role: 'id' | 'label' | 'group', name: string | undefined): number | undefined => {
    if (name === undefined) return undefined;
    const c = columnIndex.get(name);
    if (c === undefined) {
      problems.push(
        error('data-missing-column', `column "${name}" (data.${role}) is not in the data file's header`, {
          position: locate(role),
          hint: `columns are: ${t.header.join(', ')}`,
        }),
      );
    }
    return c;
  };
  const idCol = need('id', roles.id);
  const labelCol = need('label', roles.label);
  const groupCol = need('group', roles.group);
  const missing = new Set(roles.missing);
  const reserved = new Set([idCol, labelCol, groupCol].filter((c): c is number => c !== undefined));

  // Features.
  const featureCols: number[] = [];
  const ignoredColumns: string[] = [];
  if (Array.isArray(roles.features)) {
    roles.features.forEach((name, k) => {
      const c = columnIndex.get(name);
      if (c === undefined)
        problems.push(
          error('data-missing-column', `feature column "${name}" is not in the data file's header`, { position: locate('features', k) }),
        );
      else if (reserved.has(c))
        problems.push(
          error('data-feature-role', `column "${name}" is the id, label or group and cannot also be a feature`, {
            position: locate('features', k),
          }),
        );
      else featureCols.push(c);
    });
  } else {
    const exclude = new Set(roles.features?.exclude ?? []);
    (roles.features?.exclude ?? []).forEach((name, k) => {
      if (!columnIndex.has(name))
        problems.push(
          warning('data-unknown-exclude', `excluded column "${name}" is not in the data file's header`, {
            position: locate('features', k),
          }),
        );
    });
    const candidates = t.header.map((_, c) => c).filter((c) => !reserved.has(c) && !exclude.has(t.header[c]));
    const kinds = columnKinds(t, candidates, missing);
    for (const [k, c] of candidates.entries()) {
      const kind = kinds[k];
      if (kind === 'number') featureCols.push(c);
      else if (kind === 'text') ignoredColumns.push(t.header[c]);
      else
        problems.push(
          warning('data-empty-column', `column "${t.header[c]}" has no value in any row (every cell is missing), so it is not a feature`, {
            file,
            position: { line: 1, col: 1 },
            hint: 'remove it from the file, or list it under data.features.exclude',
          }),
        );
    }
  }
  if (featureCols.length === 0 && !problems.some((q) => q.severity === 'error'))
    problems.push(error('data-no-features', 'no numeric feature columns were found', { position: locate('features') }));

  const rows = t.rows;
  const rowLines = t.rowLine;
  const textCols = [idCol, labelCol, groupCol].filter((c): c is number => c !== undefined);
  const extracted = t.extract(featureCols, textCols);
  if (!extracted) return { problems, ragged: true };
  const textOf = (c: number | undefined) => (c === undefined ? undefined : extracted.texts[textCols.indexOf(c)]);
  const ids = textOf(idCol) ?? Array.from({ length: rows }, (_, r) => String(r + 1));
  if (idCol !== undefined) checkIds(t, ids, idCol, file, problems);
  const labels = textOf(labelCol) ?? [];
  let classes: string[] = [];
  const y = new Int32Array(rows);
  if (labelCol !== undefined) {
    let emptyLabels = 0;
    for (let r = 0; r < rows; r++) {
      if (labels[r] === '' || missing.has(labels[r])) {
        if (emptyLabels++ < MAX_CELL_PROBLEMS)
          problems.push(error('data-missing-label', `row ${r + 1} has no label`, cellAt(t, r, labelCol, file)));
      }
    }
    classes = [...new Set(labels)].sort(compareUtf8);
    const code = new Map(classes.map((c, i) => [c, i]));
    // Each row's label becomes its class's one string: a million rows kept a million copies of "case" and "control".
    for (let r = 0; r < rows; r++) {
      y[r] = code.get(labels[r])!;
      labels[r] = classes[y[r]];
    }
    if (classes.length < 2)
      problems.push(
        error(
          'data-one-class',
          `the label column "${roles.label}" has ${classes.length} class${classes.length === 1 ? ` ("${classes[0]}")` : 'es'}; at ` +
            `least 2 are needed`,
          { position: locate('label') },
        ),
      );
  }
  const groups = textOf(groupCol);
  if (groups) {
    let empty = 0;
    for (let r = 0; r < rows; r++) {
      if (groups[r] === '' && empty++ < MAX_CELL_PROBLEMS)
        problems.push(
          error('data-empty-group', `row ${r + 1} has an empty group cell in column "${roles.group}"`, {
            ...cellAt(t, r, groupCol!, file),
          }),
        );
    }
  }

  const cols = featureCols.length;
  problems.push(...numberProblems(t, extracted, featureCols, missing, file));
  const table: Table = {
    ids,
    labels,
    classes,
    y,
    groups,
    featureNames: featureCols.map((c) => t.header[c]),
    X: { rows, cols, data: extracted.numbers },
    rowLines,
    ignoredColumns,
    hasMissing: extracted.failed.length > 0,
  };
  return { table, problems };
}

/** Non-missing cells looked at to decide whether a column holds numbers (documented in docs/protocol.md). */
const TYPE_SAMPLE = 100;

/**
 * 'number' when at least half of the column's first 100 non-missing cells are numbers (its bad
 * cells are then errors at their positions, so a typo like `12abc`, even in the first row, is
 * reported instead of silently dropping the column), 'text' otherwise, 'empty' when every cell
 * is missing.
 */
function columnKinds(t: Grid, cols: readonly number[], missing: Set<string>): ('number' | 'text' | 'empty')[] {
  const numbers = new Int32Array(cols.length);
  const seen = new Int32Array(cols.length);
  let open = cols.length;
  // The first rows in one pass where the reader has one (a cell that is no number is then read as text alone).
  const head = Math.min(t.rows, TYPE_SAMPLE);
  const bulk = head > 0 ? t.numbersOf?.(head, cols) : undefined;
  // Row by row, columns left to right: the readers find a row's cells in one pass that way.
  for (let r = 0; r < t.rows && open > 0; r++) {
    for (let k = 0; k < cols.length; k++) {
      if (seen[k] >= TYPE_SAMPLE) continue;
      const v = bulk && r < head ? bulk[r * cols.length + k] : t.number(r, cols[k]);
      if (v === v) numbers[k]++;
      else {
        const text = t.text(r, cols[k]);
        if (text === '' || missing.has(text)) continue;
      }
      if (++seen[k] === TYPE_SAMPLE) open--;
    }
  }
  return cols.map((_, k) => (seen[k] === 0 ? 'empty' : numbers[k] * 2 >= seen[k] ? 'number' : 'text'));
}

function checkIds(t: Grid, ids: string[], idCol: number, file: string, problems: Problem[]): void {
  // Sorted by id (the split spec's order, computed once and reused by the split), equal ids are
  // neighbours with the first row of each run first (the sort is stable).
  const order = idOrder(ids);
  const firstOf = new Map<number, number>(); // repeated row → the row where its id first appears
  for (let k = 1, runStart = 0; k < order.length; k++) {
    if (ids[order[k]] !== ids[order[runStart]]) runStart = k;
    else if (ids[order[k]] !== '') firstOf.set(order[k], order[runStart]);
  }
  let reported = 0;
  for (let r = 0; r < ids.length && reported < MAX_CELL_PROBLEMS; r++) {
    if (ids[r] === '') {
      reported++;
      problems.push(error('data-empty-id', `row ${r + 1} has an empty id`, cellAt(t, r, idCol, file)));
      continue;
    }
    const first = firstOf.get(r);
    if (first !== undefined) {
      reported++;
      problems.push(
        error('data-duplicate-id', `id "${ids[r]}" appears again (first on line ${t.rowLine[first]})`, {
          ...cellAt(t, r, idCol, file),
        }),
      );
    }
  }
  // Distinct ASCII ids stay distinct under normalization: only a table with other ids needs the check.
  if (ids.every((id) => ASCII.test(id))) return;
  const seen = new Map<string, number>();
  ids.forEach((id, r) => {
    if (id !== '' && !seen.has(id)) seen.set(id, r);
  });
  const normalized = new Map<string, string>();
  for (const id of seen.keys()) {
    // ASCII text is its own normal form; only other ids need the (slow) normalizer.
    const nfc = ASCII.test(id) ? id : id.normalize('NFC');
    const other = normalized.get(nfc);
    if (other !== undefined && other !== id) {
      problems.push(
        warning(
          'data-id-normalization',
          `ids "${other}" and "${id}" differ only by Unicode normalization; the split spec hashes bytes as given, so they are ` +
            `different ids`,
          cellAt(t, seen.get(id)!, idCol, file),
        ),
      );
    } else normalized.set(nfc, id);
  }
}
