/** predictions.csv: one line per tested id and repeat, sorted by repeat then id byte order. */
import { predictedClasses } from '../metric/types.js';
import { idOrder } from '../split/key.js';
import { csvCell, csvLine } from '../table/csv-write.js';
import type { Table } from '../table/table.js';
import type { CvResult } from './cross-validate.js';

export function predictionsCsv(cv: CvResult, table: Table): string {
  const k = cv.classes.length;
  const parts = [csvLine(['id', 'repeat', 'fold', 'truth', 'predicted', ...cv.classes.map((c) => `p_${c}`)])];
  const order = idOrder(table.ids);
  const quotedClass = cv.classes.map(csvCell);
  cv.oof.forEach((proba, r) => {
    const predicted = predictedClasses(proba, k);
    for (const row of order) {
      const fold = cv.testedIn[r][row];
      if (fold === 0) continue;
      const probs: string[] = [];
      for (let c = 0; c < k; c++) probs.push(String(proba[row * k + c]));
      parts.push(`${csvCell(table.ids[row])},${r + 1},${fold},${quotedClass[table.y[row]]},${quotedClass[predicted[row]]},${probs.join(',')}\n`);
    }
  });
  return parts.join('');
}
