/**
 * predictions.csv: one line per tested id and repeat, sorted by repeat then id byte order, as
 * UTF-8 bytes (a million-line file is hashed and written as it is, never held as text).
 */
import { predictedClasses } from '../metric/types.js';
import { idOrder } from '../split/key.js';
import { csvCell, csvCells, csvLine, TextBuilder } from '../table/csv-write.js';
import type { Table } from '../table/table.js';
import type { CvResult } from './cross-validate.js';

export function predictionsCsv(cv: CvResult, table: Table): Uint8Array {
  const k = cv.classes.length;
  const out = new TextBuilder();
  out.add(csvLine(['id', 'repeat', 'fold', 'truth', 'predicted', ...cv.classes.map((c) => `p_${c}`)]));
  const order = idOrder(table.ids);
  const quotedClass = cv.classes.map(csvCell);
  const quotedIds = csvCells(table.ids);
  let lines = 0;
  let total = 0;
  for (const tested of cv.testedIn) for (let i = 0; i < tested.length; i++) if (tested[i] !== 0) total++;
  cv.oof.forEach((proba, r) => {
    const predicted = predictedClasses(proba, k);
    const repeat = `,${r + 1},`;
    for (let i = 0; i < order.length; i++) {
      const row = order[i];
      const fold = cv.testedIn[r][row];
      if (fold === 0) continue;
      let line = quotedIds[row] + repeat + fold + ',' + quotedClass[table.y[row]] + ',' + quotedClass[predicted[row]];
      for (let c = 0; c < k; c++) line += ',' + proba[row * k + c];
      out.add(line + '\n');
      // The first thousand lines tell the size of the rest: room for all of it at once.
      if (++lines === 1000 && total > 2000) out.reserve(Math.ceil((out.size / lines) * total * 1.1) + 65536);
    }
  });
  return out.utf8();
}
