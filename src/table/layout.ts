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
    extract(numberCols, textCols): Extracted {
      const width = numberCols.length;
      const numbers = new Float64Array(rows * width);
      const failed: number[] = [];
      for (let r = 0; r < rows; r++) {
        for (let k = 0; k < width; k++) {
          const v = this.number(r, numberCols[k]);
          if (v !== v) failed.push(r * width + k);
          numbers[r * width + k] = v;
        }
      }
      return { numbers, failed, texts: textCols.map((c) => Array.from({ length: rows }, (_, r) => this.text(r, c))) };
    },
  };
  return { grid, problems, matrixOnly, sheetOnly };
}
