/**
 * New rows that carry the id of a row of the cross-validation. A row that is the same row (the
 * same feature values) takes its held-out prediction; a different row under a training id is an
 * error, never silently given another row's prediction. Pure.
 */
import { error, type Problem } from '../problems/problem.js';
import { featureDigests } from '../table/row-digest.js';
import type { NewRows } from '../table/new-rows.js';

/** Where the training row of an id is, for the message: a file and line, or a description. */
export type TrainingPlace = (id: string) => { where: string; file?: string; line?: number };

export function knownIdProblems(
  rows: NewRows,
  file: string,
  features: readonly string[],
  known: ReadonlyMap<string, string>,
  place: TrainingPlace,
): Problem[] {
  const out: Problem[] = [];
  let digests: string[] | undefined;
  rows.ids.forEach((id, r) => {
    const recorded = known.get(id);
    if (recorded === undefined) return;
    const p = place(id);
    if (rows.absent) {
      out.push(
        error(
          'new-row-known-id',
          `new row "${id}" has the id of a row of the cross-validation (${p.where}), and without every feature column its values cannot be compared with that row's`,
          {
            file,
            position: { line: rows.lines[r], col: 1 },
            hint: 'give the new sample an id of its own, or include every feature column so foldseal can tell whether it is that row',
          },
        ),
      );
      return;
    }
    digests ??= featureDigests(rows.X, features);
    if (digests[r] === recorded) return;
    out.push(
      error('new-row-known-id', `new row "${id}" has the id of a row of the cross-validation (${p.where}) but different feature values`, {
        file,
        position: { line: rows.lines[r], col: 1 },
        hint: "give the new sample an id of its own: a row under a training id would get that row's held-out prediction",
      }),
    );
  });
  return out;
}

/** id → feature digest of every row of the cross-validation (saved in models.json for apply), or of `rows` only. */
export function knownRows(
  ids: readonly string[],
  X: NewRows['X'],
  features: readonly string[],
  rows?: readonly number[],
): Record<string, string> {
  const d = featureDigests(X, features, rows);
  const out: Record<string, string> = {};
  d.forEach((digest, k) => {
    out[ids[rows ? rows[k] : k]] = digest;
  });
  return out;
}
