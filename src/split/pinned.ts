/** A pinned assignment file (same CSV as `foldseal folds` writes) checked against the table's ids. */
import { error, type Problem } from '../problems/problem.js';
import { cellPosition, readDelimited, textColumn } from '../table/delimited.js';
import { SPLIT_VERSION, type Assignment } from './assignment.js';

const MAX_LISTED = 10;

export function parsePinned(bytes: Uint8Array, file: string, ids: readonly string[]): { assignment?: Assignment; problems: Problem[] } {
  const read = readDelimited(bytes, 0x2c, file);
  if (!read.table) return { problems: read.problems };
  const t = read.table;
  const problems: Problem[] = [];
  if (t.header.join(',') !== 'id,repeat,fold') {
    problems.push(
      error('pinned-header', `the pinned file's header is "${t.header.join(',')}", expected "id,repeat,fold"`, {
        file,
        position: { line: 1, col: 1 },
      }),
    );
    return { problems };
  }
  const rowOf = new Map(ids.map((id, i) => [id, i]));
  const fileIds = textColumn(t, 0);
  const repeatText = textColumn(t, 1);
  const foldText = textColumn(t, 2);
  const at = (r: number, c: number) => ({ file, position: cellPosition(t, r, c) });
  let repeats = 0;
  let folds = 0;
  const positiveInt = /^[1-9][0-9]{0,8}$/;
  for (let r = 0; r < t.rows; r++) {
    if (!positiveInt.test(repeatText[r]))
      problems.push(error('pinned-bad-repeat', `repeat "${repeatText[r]}" is not a positive integer`, at(r, 1)));
    else repeats = Math.max(repeats, Number(repeatText[r]));
    if (!positiveInt.test(foldText[r]) || Number(foldText[r]) > Math.max(ids.length, 2)) {
      problems.push(error('pinned-fold-range', `fold "${foldText[r]}" is out of range (1 to ${Math.max(ids.length, 2)})`, at(r, 2)));
    } else folds = Math.max(folds, Number(foldText[r]));
  }
  if (problems.length) return { problems };
  const n = ids.length;
  const fold = new Int32Array(n * repeats);
  let unknown = 0;
  for (let r = 0; r < t.rows; r++) {
    const row = rowOf.get(fileIds[r]);
    const rep = Number(repeatText[r]);
    if (row === undefined) {
      if (unknown++ < MAX_LISTED) problems.push(error('pinned-unknown-id', `id "${fileIds[r]}" is not in the data`, at(r, 0)));
      continue;
    }
    const k = (rep - 1) * n + row;
    if (fold[k] !== 0) problems.push(error('pinned-duplicate-id', `id "${fileIds[r]}" appears twice in repeat ${rep}`, at(r, 0)));
    else fold[k] = Number(foldText[r]);
  }
  if (unknown > MAX_LISTED)
    problems.push(error('pinned-unknown-id', `${unknown - MAX_LISTED} more ids of the pinned file are not in the data`, { file }));
  for (let rep = 1; rep <= repeats; rep++) {
    const absent: string[] = [];
    const used = new Uint8Array(folds + 1);
    for (let i = 0; i < n; i++) {
      const f = fold[(rep - 1) * n + i];
      if (f === 0) absent.push(ids[i]);
      else used[f] = 1;
    }
    if (absent.length) {
      const listed = absent
        .slice(0, MAX_LISTED)
        .map((s) => `"${s}"`)
        .join(', ');
      problems.push(
        error(
          'pinned-missing-id',
          `${absent.length} id${absent.length === 1 ? '' : 's'} of the data ${absent.length === 1 ? 'has' : 'have'} no fold in ` +
            `repeat ${rep}: ${listed}${absent.length > MAX_LISTED ? ', …' : ''}`,
          { file, position: { line: 1, col: 1 } },
        ),
      );
    }
    for (let f = 1; f <= folds; f++) {
      if (!used[f] && !absent.length)
        problems.push(error('pinned-empty-fold', `fold ${f} of repeat ${rep} has no rows`, { file, position: { line: 1, col: 1 } }));
    }
  }
  if (folds < 2 && problems.length === 0)
    problems.push(
      error('pinned-one-fold', 'the pinned file puts every row in one fold; at least 2 folds are needed', {
        file,
        position: { line: 1, col: 1 },
      }),
    );
  if (problems.length) return { problems };
  return { assignment: { version: SPLIT_VERSION, ids: [...ids], repeats, folds, fold }, problems };
}
