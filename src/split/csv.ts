/** The assignment CSV (`id,repeat,fold`), sorted by repeat then id byte order (spec §6). */
import { csvCells } from '../table/csv-write.js';
import { ByteBuilder } from '../util/byte-builder.js';
import { sha256Pieces } from '../util/sha256.js';
import type { Assignment } from './assignment.js';
import { idOrder } from './key.js';

export function assignmentCsv(a: Assignment): string {
  // Without a piece size, the one piece is the whole file.
  const [whole] = assignmentCsvPieces(a, Number.POSITIVE_INFINITY);
  return Buffer.from(whole.buffer, whole.byteOffset, whole.length).toString('utf8');
}

/**
 * SHA-256 of the assignment CSV (what manifests, lock files and shard parts record), hashed piece
 * by piece; kept per assignment (which never changes once made), so a run may take it early,
 * while it waits for its folds.
 */
export function assignmentSha256(a: Assignment): string {
  let hash = hashes.get(a);
  if (hash === undefined) {
    hash = sha256Pieces(assignmentCsvPieces(a));
    hashes.set(a, hash);
  }
  return hash;
}

const hashes = new WeakMap<Assignment, string>();

/**
 * The file as UTF-8 bytes in pieces of about `piece` bytes, written row by row without a string
 * per row: views of one reused buffer, each valid until the next is asked for (a million-row run
 * hashes the file without holding it).
 */
export function* assignmentCsvPieces(a: Assignment, piece = 1 << 20): Generator<Uint8Array> {
  const order = idOrder(a.ids);
  const n = a.ids.length;
  const out = new ByteBuilder(Math.min(piece, n * a.repeats * 14) + 4096);
  out.text('id,repeat,fold\n');
  const quoted = csvCells(a.ids);
  for (let r = 1; r <= a.repeats; r++) {
    const base = (r - 1) * n;
    for (let k = 0; k < n; k++) {
      const row = order[k];
      out.text(quoted[row]);
      out.byte(0x2c);
      out.int(r);
      out.byte(0x2c);
      out.int(a.fold[base + row]);
      out.byte(0x0a);
      if (out.length >= piece) {
        yield out.result();
        out.clear();
      }
    }
  }
  yield out.result();
}
