/**
 * New rows that carry the id of a row of the cross-validation. A row that is the same row (the
 * same feature values) takes its held-out prediction; a different row under a training id is an
 * error, never silently given another row's prediction. Pure.
 */
import { error, type Problem } from '../problems/problem.js';
import { featureDigests, featureHashes } from '../table/row-digest.js';
import type { NewRows } from '../table/new-rows.js';
import { ByteBuilder } from '../util/byte-builder.js';

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
 * knownRows for a run's models.json, kept as the ids and their rows' hashes: a million-key object
 * is slow to build and to serialize, so this writes its JSON itself (exactly as JSON.stringify
 * would write the object), as bytes, with no string per row.
 */
export class KnownRowList {
  constructor(
    readonly ids: readonly string[],
    /** featureHashes of the rows: two words per id. */
    readonly hashes: Uint32Array,
  ) {}

  static of(ids: readonly string[], X: NewRows['X'], features: readonly string[]): KnownRowList {
    return new KnownRowList(ids, featureHashes(X, features));
  }

  /** The object's JSON text. */
  json(): string {
    return Buffer.from(this.bytes()).toString('utf8');
  }

  /** `before`, the object's JSON, then `after`, as UTF-8 in one buffer. */
  bytes(before = '', after = ''): Uint8Array {
    // Without a piece size, the one piece is the whole text.
    const [whole] = this.pieces(before, after, Number.POSITIVE_INFINITY);
    return whole;
  }

  /**
   * `before`, the object's JSON, then `after`, as UTF-8 in pieces of about `piece` bytes: views of
   * one reused buffer, each valid until the next is asked for (a million known rows are written
   * to their file without being held whole). Keys come in a JavaScript object's own order — array
   * indices ("0", "17"; at most 2³² − 2, no leading zero) ascending, then the other keys as
   * inserted. Ids are unique.
   */
  *pieces(before = '', after = '', piece = 1 << 20): Generator<Uint8Array> {
    const { ids, hashes } = this;
    const n = ids.length;
    const indices: number[] = [];
    let idChars = 0;
    for (let k = 0; k < n; k++) {
      if (isArrayIndex(ids[k])) indices.push(k);
      idChars += ids[k].length;
    }
    indices.sort((a, b) => Number(ids[a]) - Number(ids[b]));
    const isIndex = new Uint8Array(n);
    for (const k of indices) isIndex[k] = 1;
    // Each member: "id":"16 hex digits" and a comma; ids that need escapes or are not ASCII grow it.
    const whole = Buffer.byteLength(before) + Buffer.byteLength(after) + idChars + n * 22 + 2;
    const out = new ByteBuilder(Math.min(whole, piece + 4096));
    out.text(before);
    out.byte(0x7b); // {
    let first = true;
    const member = (k: number) => {
      if (!first) out.byte(0x2c);
      first = false;
      out.jsonString(ids[k]);
      out.byte(0x3a); // :
      out.byte(0x22);
      out.hex8(hashes[2 * k]);
      out.hex8(hashes[2 * k + 1]);
      out.byte(0x22);
    };
    for (const k of indices) member(k);
    for (let k = 0; k < n; k++) {
      if (isIndex[k] === 0) member(k);
      if (out.length >= piece) {
        yield out.result();
        out.clear();
      }
    }
    out.byte(0x7d); // }
    out.text(after);
    yield out.result();
  }
}

function isArrayIndex(key: string): boolean {
  // Most ids start with a letter: no pattern match for them.
  const c = key.charCodeAt(0);
  if (!(c >= 0x30 && c <= 0x39)) return false;
  return /^(?:0|[1-9]\d{0,9})$/.test(key) && Number(key) < 2 ** 32 - 1;
}
