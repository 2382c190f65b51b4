/**
 * New rows that carry the id of a row of the cross-validation. A row that is the same row (the
 * same feature values) takes its held-out prediction; a different row under a training id is an
 * error, never silently given another row's prediction. Pure.
 */
import { error, type Problem } from '../problems/problem.js';
import { featureDigests } from '../table/row-digest.js';
import { TextBuilder } from '../table/csv-write.js';
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
  // No prototype: an id "__proto__" is a key like any other (on a plain object it set the prototype and vanished).
  const out: Record<string, string> = Object.create(null);
  d.forEach((digest, k) => {
    out[ids[rows ? rows[k] : k]] = digest;
  });
  return out;
}

/**
 * knownRows for a run's models.json, kept as two lists: a million-key object is slow to build and
 * to serialize, so modelsJson writes this one's JSON text itself (exactly as JSON.stringify would
 * write the object).
 */
export class KnownRowList {
  constructor(
    readonly ids: readonly string[],
    readonly digests: readonly string[],
  ) {}

  static of(ids: readonly string[], X: NewRows['X'], features: readonly string[]): KnownRowList {
    return new KnownRowList(ids, featureDigests(X, features));
  }

  /**
   * The object's JSON: keys in a JavaScript object's own order — array indices ("0", "17"; at
   * most 2³² − 2, no leading zero) ascending, then the other keys as inserted. Ids are unique.
   */
  json(): string {
    const indices: number[] = [];
    const others: number[] = [];
    for (let k = 0; k < this.ids.length; k++) (isArrayIndex(this.ids[k]) ? indices : others).push(k);
    indices.sort((a, b) => Number(this.ids[a]) - Number(this.ids[b]));
    // Written into one buffer as it goes: a million member strings joined at the end made as much
    // garbage again as the text itself.
    const out = new TextBuilder();
    out.add('{');
    let first = true;
    for (const list of [indices, others])
      for (const k of list) {
        out.add(`${first ? '' : ','}${JSON.stringify(this.ids[k])}:"${this.digests[k]}"`);
        first = false;
      }
    out.add('}');
    return out.text();
  }
}

function isArrayIndex(key: string): boolean {
  return /^(?:0|[1-9]\d{0,9})$/.test(key) && Number(key) < 2 ** 32 - 1;
}
