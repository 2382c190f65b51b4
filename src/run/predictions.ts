/**
 * predictions.csv: one line per tested id and repeat, sorted by repeat then id byte order, as
 * UTF-8 bytes written cell by cell (a million-line file is hashed and written as it is made,
 * never held as text, and no string is made per line).
 */
import { predictedClasses } from '../metric/types.js';
import { idOrder } from '../split/key.js';
import { csvCell, csvCells, csvLine, numberText } from '../table/csv-write.js';
import type { Table } from '../table/table.js';
import { ByteBuilder } from '../util/byte-builder.js';
import type { CvResult } from './cross-validate.js';

export function predictionsCsv(cv: CvResult, table: Table): Uint8Array {
  // Without a piece size, the one piece is the whole file.
  const [whole] = predictionsPieces(cv, table, Number.POSITIVE_INFINITY);
  return whole;
}

/**
 * predictions.csv in pieces of about `piece` bytes, for a file written as it is made: each piece
 * is a view of one reused buffer, valid until the next is asked for.
 */
export function* predictionsPieces(cv: CvResult, table: Table, piece = 1 << 20): Generator<Uint8Array> {
  const k = cv.classes.length;
  const order = idOrder(table.ids);
  const quotedClass = cv.classes.map(csvCell);
  const quotedIds = csvCells(table.ids);
  let lines = 0;
  for (const tested of cv.testedIn) for (let i = 0; i < tested.length; i++) if (tested[i] !== 0) lines++;
  // About a line's bytes: the id, repeat and fold, two class names and k probabilities of up to 24 characters.
  const longestClass = Math.max(...quotedClass.map((c) => Buffer.byteLength(c)));
  const perLine = 16 + 2 * longestClass + k * 25 + (quotedIds.length ? Buffer.byteLength(quotedIds[order[order.length - 1]]) + 8 : 0);
  const out = new ByteBuilder(Math.min(piece, lines * perLine) + 65536);
  out.text(csvLine(['id', 'repeat', 'fold', 'truth', 'predicted', ...cv.classes.map((c) => `p_${c}`)]));
  for (let r = 0; r < cv.oof.length; r++) {
    const proba = cv.oof[r];
    const predicted = predictedClasses(proba, k);
    const testedIn = cv.testedIn[r];
    for (let i = 0; i < order.length; i++) {
      const row = order[i];
      const fold = testedIn[row];
      if (fold === 0) continue;
      out.text(quotedIds[row]);
      out.byte(0x2c);
      out.int(r + 1);
      out.byte(0x2c);
      out.int(fold);
      out.byte(0x2c);
      out.text(quotedClass[table.y[row]]);
      out.byte(0x2c);
      out.text(quotedClass[predicted[row]]);
      for (let c = 0; c < k; c++) {
        out.byte(0x2c);
        out.text(numberText(proba[row * k + c]));
      }
      out.byte(0x0a);
      if (out.length >= piece) {
        yield out.result();
        out.clear();
      }
    }
  }
  yield out.result();
}
