/**
 * predictions.csv: one line per tested id and repeat, sorted by repeat then id byte order, as
 * UTF-8 bytes (a million-line file is hashed and written as it is, never held as text).
 */
import { predictedClasses } from '../metric/types.js';
import { idOrder } from '../split/key.js';
import { csvCell, csvCells, csvLine, numberText, TextBuilder } from '../table/csv-write.js';
import type { Table } from '../table/table.js';
import type { CvResult } from './cross-validate.js';

export function predictionsCsv(cv: CvResult, table: Table): Uint8Array {
  const out = new TextBuilder();
  let total = 0;
  for (const tested of cv.testedIn) for (let i = 0; i < tested.length; i++) if (tested[i] !== 0) total++;
  let sized = false;
  for (const lines of predictionLines(cv, table)) {
    out.add(lines);
    // The first lines tell the size of the rest: room for all of it at once (each fresh buffer is slow to touch).
    if (!sized && total > 2000) {
      sized = true;
      const count = lines.split('\n').length - 1;
      out.reserve(Math.ceil((lines.length / count) * total * 1.1) + 65536);
    }
  }
  return out.utf8();
}

/**
 * predictions.csv in pieces of about `piece` bytes, for a file written as it is made: each piece
 * is a view of one reused buffer, valid until the next is asked for.
 */
export function* predictionsPieces(cv: CvResult, table: Table, piece = 1 << 20): Generator<Uint8Array> {
  const out = new TextBuilder(piece + 65536);
  for (const lines of predictionLines(cv, table)) {
    out.add(lines);
    if (out.size >= piece) yield out.drain();
  }
  yield out.drain();
}

/** The file's text, a few thousand lines at a time. */
function* predictionLines(cv: CvResult, table: Table): Generator<string> {
  const k = cv.classes.length;
  const order = idOrder(table.ids);
  const quotedClass = cv.classes.map(csvCell);
  const quotedIds = csvCells(table.ids);
  let pending = csvLine(['id', 'repeat', 'fold', 'truth', 'predicted', ...cv.classes.map((c) => `p_${c}`)]);
  for (let r = 0; r < cv.oof.length; r++) {
    const proba = cv.oof[r];
    const predicted = predictedClasses(proba, k);
    const repeat = `,${r + 1},`;
    const testedIn = cv.testedIn[r];
    for (let i = 0; i < order.length; i++) {
      const row = order[i];
      const fold = testedIn[row];
      if (fold === 0) continue;
      let line = quotedIds[row] + repeat + fold + ',' + quotedClass[table.y[row]] + ',' + quotedClass[predicted[row]];
      for (let c = 0; c < k; c++) line += ',' + numberText(proba[row * k + c]);
      pending += line + '\n';
      if (pending.length >= 1 << 16) {
        yield pending;
        pending = '';
      }
    }
  }
  yield pending;
}
