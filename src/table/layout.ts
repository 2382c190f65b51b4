/**
 * Grids over other grids, so that one table builder serves every way data is held:
 * - a features-in-rows matrix (first column: feature names; header: sample ids; the usual
 *   expression-matrix orientation) seen with samples as rows, without a transposed copy of its text;
 * - a matrix joined by id to a sample sheet that holds the label, the group and covariates.
 * Pure.
 */
import { error, warning, type Problem } from '../problems/problem.js';
import type { Extracted, Grid } from './grid.js';

/** The features-in-rows matrix `m` seen with one row per sample: column 0 holds the sample ids (named `idName`). */
export function transposedGrid(m: Grid, idName: string): Grid {
  const rows = m.header.length - 1;
  const header = [idName, ...Array.from({ length: m.rows }, (_, i) => m.text(i, 0))];
  return {
    header,
    rows,
    // A sample's cells share the header line; its id is there.
    rowLine: new Int32Array(rows).fill(1),
    text: (r, c) => (c === 0 ? m.header[r + 1] : m.text(c - 1, r + 1)),
    number: (r, c) => (c === 0 ? Number.NaN : m.number(c - 1, r + 1)),
    position: (r, c) => (c === 0 ? { line: 1, col: 1 } : m.position(c - 1, r + 1)),
    extract(numberCols, textCols) {
      const width = numberCols.length;
      const numbers = new Float64Array(rows * width);
      // Matrix row by matrix row (the order the bytes lie in), each feature's cells go to its column.
      for (let j = 0; j < width; j++) {
        const i = numberCols[j] - 1;
        for (let r = 0; r < rows; r++) numbers[r * width + j] = m.number(i, r + 1);
      }
      const failed: number[] = [];
      for (let k = 0; k < numbers.length; k++) if (numbers[k] !== numbers[k]) failed.push(k);
      return { numbers, failed, texts: textCols.map((c) => Array.from({ length: rows }, (_, r) => this.text(r, c))) };
    },
  };
}

export interface JoinResult {
  grid?: Grid;
  problems: Problem[];
  /** Matrix samples without a sample-sheet row, and sample-sheet ids without matrix samples (dropped or errors). */
  matrixOnly: string[];
  sheetOnly: string[];
}

export interface JoinSettings {
  /** The id column: in the sample sheet, and in a samples-in-rows matrix. */
  id: string;
  /** Sample-sheet columns carried into the table (label, group); no other sheet column is ever a feature. */
  carry: string[];
  unmatched: 'error' | 'drop';
  matrixFile: string;
  sheetFile: string;
  /** Where in the protocol the sample sheet is declared (for problems about it as a whole). */
  at: Partial<Problem>;
}

const listed = (ids: string[]) =>
  ids
    .slice(0, 5)
    .map((id) => `"${id}"`)
    .join(', ') + (ids.length > 5 ? `, … (${ids.length - 5} more)` : '');

/** `m` (one row per sample) joined to the sample sheet `s` by id; the matrix's sample order is kept. */
export function joinedGrid(m: Grid, s: Grid, j: JoinSettings): JoinResult {
  const problems: Problem[] = [];
  const mi = m.header.indexOf(j.id);
  const si = s.header.indexOf(j.id);
  if (mi < 0)
    problems.push(
      error('data-missing-column', `column "${j.id}" (data.id) is not in the data file's header`, {
        ...j.at,
        file: undefined,
        hint: `the data file ${j.matrixFile} needs the sample id column too`,
      }),
    );
  if (si < 0)
    problems.push(
      error('samples-missing-column', `column "${j.id}" (data.id) is not in the sample sheet ${j.sheetFile}`, {
        ...j.at,
        hint: `its columns are: ${s.header.join(', ')}`,
      }),
    );
  const carried = j.carry.map((name) => {
    const c = s.header.indexOf(name);
    if (c < 0)
      problems.push(
        error('samples-missing-column', `column "${name}" is not in the sample sheet ${j.sheetFile}`, {
          ...j.at,
          hint: `its columns are: ${s.header.join(', ')}`,
        }),
      );
    return c;
  });
  if (problems.length) return { problems, matrixOnly: [], sheetOnly: [] };
  const sheetRow = new Map<string, number>();
  for (let r = 0; r < s.rows; r++) {
    const id = s.text(r, si);
    const first = sheetRow.get(id);
    if (first !== undefined)
      problems.push(
        error('samples-duplicate-id', `id "${id}" appears again in the sample sheet (first on line ${s.rowLine[first]})`, {
          file: j.sheetFile,
          position: s.position(r, si),
        }),
      );
    else sheetRow.set(id, r);
  }
  const kept: number[] = [];
  const keptSheet: number[] = [];
  const matrixOnly: string[] = [];
  const matched = new Set<string>();
  for (let r = 0; r < m.rows; r++) {
    const id = m.text(r, mi);
    const sr = sheetRow.get(id);
    if (sr === undefined) matrixOnly.push(id);
    else {
      kept.push(r);
      keptSheet.push(sr);
      matched.add(id);
    }
  }
  const sheetOnly = [...sheetRow.keys()].filter((id) => !matched.has(id));
  const report = j.unmatched === 'error' ? error : warning;
  const verb = j.unmatched === 'error' ? 'are' : 'were left out:';
  if (matrixOnly.length)
    problems.push(
      report(
        'samples-unmatched',
        `${matrixOnly.length} sample${matrixOnly.length === 1 ? '' : 's'} of ${j.matrixFile} ${verb} not in the sample sheet: ${listed(matrixOnly)}`,
        {
          ...j.at,
          hint: j.unmatched === 'error' ? 'add them to the sample sheet, or set data.samples.unmatched: drop' : undefined,
        },
      ),
    );
  if (sheetOnly.length)
    problems.push(
      report(
        'samples-unmatched',
        `${sheetOnly.length} sample-sheet row${sheetOnly.length === 1 ? '' : 's'} ${verb} not in ${j.matrixFile}: ${listed(sheetOnly)}`,
        {
          ...j.at,
          hint: j.unmatched === 'error' ? 'remove them from the sample sheet, or set data.samples.unmatched: drop' : undefined,
        },
      ),
    );
  const mw = m.header.length;
  const rows = kept.length;
  const rowLine = Int32Array.from(kept, (r) => m.rowLine[r]);
  const grid: Grid = {
    header: [...m.header, ...j.carry],
    rows,
    rowLine,
    text: (r, c) => (c < mw ? m.text(kept[r], c) : s.text(keptSheet[r], carried[c - mw])),
    number: (r, c) => (c < mw ? m.number(kept[r], c) : s.number(keptSheet[r], carried[c - mw])),
    position: (r, c) => (c < mw ? m.position(kept[r], c) : { ...s.position(keptSheet[r], carried[c - mw]), file: j.sheetFile }),
    extract: (numberCols, textCols) => extractCells(rows, grid.number, grid.text, numberCols, textCols),
  };
  return { grid, problems, matrixOnly, sheetOnly };
}

/** One pass of a grid built over another: every row's number cells, then the text columns (Grid.extract). */
function extractCells(
  rows: number,
  number: (r: number, c: number) => number,
  text: (r: number, c: number) => string,
  numberCols: readonly number[],
  textCols: readonly number[],
): Extracted {
  const width = numberCols.length;
  const numbers = new Float64Array(rows * width);
  const failed: number[] = [];
  for (let r = 0; r < rows; r++)
    for (let k = 0; k < width; k++) {
      const v = number(r, numberCols[k]);
      if (v !== v) failed.push(r * width + k);
      numbers[r * width + k] = v;
    }
  return { numbers, failed, texts: textCols.map((c) => Array.from({ length: rows }, (_, r) => text(r, c))) };
}

/** The rows of `g` listed in `rows`, in that order. */
export function rowsOf(g: Grid, rows: Int32Array): Grid {
  return {
    header: g.header,
    rows: rows.length,
    rowLine: Int32Array.from(rows, (r) => g.rowLine[r]),
    text: (r, c) => g.text(rows[r], c),
    number: (r, c) => g.number(rows[r], c),
    position: (r, c) => g.position(rows[r], c),
    extract: (numberCols, textCols) =>
      extractCells(
        rows.length,
        (r, c) => g.number(rows[r], c),
        (r, c) => g.text(rows[r], c),
        numberCols,
        textCols,
      ),
  };
}

export interface FilterResult {
  grid?: Grid;
  problems: Problem[];
  before: number;
  after: number;
}

/** Rows whose cell in every `where` column is one of its listed values (a declarative filter: nothing is evaluated). */
export function filteredGrid(g: Grid, where: Record<string, string[]>, at: (column: string) => Partial<Problem>): FilterResult {
  const problems: Problem[] = [];
  const tests: [number, Set<string>][] = [];
  for (const [column, values] of Object.entries(where)) {
    const c = g.header.indexOf(column);
    if (c < 0)
      problems.push(
        error('data-missing-column', `column "${column}" (data.where) is in neither the data file nor the sample sheet`, at(column)),
      );
    else tests.push([c, new Set(values)]);
  }
  if (problems.length) return { problems, before: g.rows, after: 0 };
  const kept: number[] = [];
  for (let r = 0; r < g.rows; r++) if (tests.every(([c, values]) => values.has(g.text(r, c)))) kept.push(r);
  if (!kept.length)
    problems.push(
      error('data-no-rows', `no row has ${Object.keys(where).join(' and ')} among the values data.where lists`, at(Object.keys(where)[0])),
    );
  return { grid: rowsOf(g, Int32Array.from(kept)), problems, before: g.rows, after: kept.length };
}

/** The label column read through a map of label values to classes; a value in no class is an error at its cell. */
export function relabeledGrid(
  g: Grid,
  labelCol: number,
  classes: Record<string, string[]>,
  file: string,
  missing: ReadonlySet<string>,
): { grid: Grid; problems: Problem[] } {
  const classOf = new Map<string, string>();
  for (const [name, values] of Object.entries(classes)) for (const v of values) classOf.set(v, name);
  const problems: Problem[] = [];
  const unmapped = new Map<string, number>();
  for (let r = 0; r < g.rows; r++) {
    const v = g.text(r, labelCol);
    if (v === '' || missing.has(v) || classOf.has(v)) continue;
    unmapped.set(v, (unmapped.get(v) ?? 0) + 1);
    if (unmapped.get(v) === 1) {
      const p = g.position(r, labelCol);
      problems.push(
        error('label-unmapped', `label value "${v}" is in no class of data.classes`, {
          file: p.file ?? file,
          position: { line: p.line, col: p.col },
          hint: `add it to one of the classes (${Object.keys(classes).join(', ')}), or leave such rows out with data.where`,
        }),
      );
    }
  }
  const mapped = (r: number, c: number) => (c === labelCol ? (classOf.get(g.text(r, c)) ?? g.text(r, c)) : g.text(r, c));
  return {
    grid: {
      ...g,
      text: mapped,
      extract(numberCols, textCols) {
        const out = g.extract(numberCols, textCols)!;
        const k = textCols.indexOf(labelCol);
        if (k >= 0) out.texts[k] = out.texts[k].map((v) => classOf.get(v) ?? v);
        return out;
      },
    },
    problems,
  };
}
