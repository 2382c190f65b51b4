/**
 * New rows that carry the id of a row of the cross-validation. A row that is the same row (the
 * same feature values) takes its held-out prediction; a different row under a training id is an
 * error, never silently given another row's prediction. Pure.
 */
import { error, type Problem } from '../problems/problem.js';
import { featureDigests, featureHashes } from '../table/row-digest.js';
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

  /**
   * `before`, the object's JSON, then `after`, as UTF-8 in one buffer. Keys come in a JavaScript
   * object's own order — array indices ("0", "17"; at most 2³² − 2, no leading zero) ascending,
   * then the other keys as inserted. Ids are unique.
   */
  bytes(before = '', after = ''): Uint8Array {
    const indices: number[] = [];
    const others: number[] = [];
    let idChars = 0;
    for (let k = 0; k < this.ids.length; k++) {
      (isArrayIndex(this.ids[k]) ? indices : others).push(k);
      idChars += this.ids[k].length;
    }
    indices.sort((a, b) => Number(this.ids[a]) - Number(this.ids[b]));
    // Each member: "id":"16 hex digits" and a comma; ids that need escapes or are not ASCII grow it.
    let out = Buffer.allocUnsafe(Buffer.byteLength(before) + Buffer.byteLength(after) + idChars + this.ids.length * 22 + 2);
    let at = out.write(before, 0);
    const room = (n: number) => {
      if (at + n <= out.length) return;
      const grown = Buffer.allocUnsafe(Math.max(out.length * 2, at + n));
      out.copy(grown, 0, 0, at);
      out = grown;
    };
    out[at++] = 0x7b; // {
    let first = true;
    for (const list of [indices, others])
      for (const k of list) {
        const id = this.ids[k];
        const escaped = plainAscii(id) ? undefined : JSON.stringify(id);
        room((escaped === undefined ? id.length + 2 : Buffer.byteLength(escaped)) + 21);
        if (!first) out[at++] = 0x2c;
        first = false;
        if (escaped === undefined) {
          out[at++] = 0x22;
          for (let i = 0; i < id.length; i++) out[at++] = id.charCodeAt(i);
          out[at++] = 0x22;
        } else at += out.write(escaped, at);
        out[at++] = 0x3a; // :
        out[at++] = 0x22;
        at = hex8(out, at, this.hashes[2 * k]);
        at = hex8(out, at, this.hashes[2 * k + 1]);
        out[at++] = 0x22;
      }
    room(Buffer.byteLength(after) + 1);
    out[at++] = 0x7d; // }
    at += out.write(after, at);
    return out.subarray(0, at);
  }
}

const HEX = Uint8Array.from('0123456789abcdef', (c) => c.charCodeAt(0));

function hex8(out: Uint8Array, at: number, word: number): number {
  for (let shift = 28; shift >= 0; shift -= 4) out[at++] = HEX[(word >>> shift) & 15];
  return at;
}

/** Printable ASCII without a quote or a backslash: JSON writes it as it is. */
function plainAscii(text: string): boolean {
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 0x20 || c > 0x7e || c === 0x22 || c === 0x5c) return false;
  }
  return true;
}

function isArrayIndex(key: string): boolean {
  return /^(?:0|[1-9]\d{0,9})$/.test(key) && Number(key) < 2 ** 32 - 1;
}
