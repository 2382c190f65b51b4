/**
 * Signals that separate the classes too well to be biology: one feature that splits every pair
 * of classes almost perfectly (a label copied into the features, a post-outcome measurement),
 * and ids or row order that follow the class. Pure.
 */
import { aucOf } from '../metric/ranking.js';
import { note, warning, type Problem } from '../problems/problem.js';
import { AUDIT_CODE } from './kinds.js';
import { type AuditInput, plural } from './input.js';
import { AUDIT_THRESHOLDS } from './thresholds.js';

/**
 * How well `score` orders every pair of classes: the smallest, over class pairs present, of
 * max(AUC, 1 − AUC) with the rows of the two classes (rows where score is NaN left out).
 * Null when fewer than two classes have rows with a score.
 */
export function pairwiseSeparation(score: Float64Array, y: Int32Array, classes: number): number | null {
  let worst: number | null = null;
  for (let a = 0; a < classes; a++) {
    for (let b = a + 1; b < classes; b++) {
      let n = 0;
      for (let i = 0; i < y.length; i++) if ((y[i] === a || y[i] === b) && score[i] === score[i]) n++;
      const s = new Float64Array(n);
      const pos = new Uint8Array(n);
      for (let i = 0, k = 0; i < y.length; i++) {
        if ((y[i] === a || y[i] === b) && score[i] === score[i]) {
          s[k] = score[i];
          pos[k++] = y[i] === a ? 1 : 0;
        }
      }
      const auc = aucOf(s, pos);
      if (auc === null) continue;
      const sep = Math.max(auc, 1 - auc);
      worst = worst === null ? sep : Math.min(worst, sep);
    }
  }
  return worst;
}

export function proxyFindings(input: AuditInput): Problem[] {
  const { table } = input;
  const { rows, cols, data } = table.X;
  const k = table.classes.length;
  const column = new Float64Array(rows);
  const out: Problem[] = [];
  for (let c = 0; c < cols; c++) {
    for (let r = 0; r < rows; r++) column[r] = data[r * cols + c];
    const sep = pairwiseSeparation(column, table.y, k);
    if (sep === null || sep < AUDIT_THRESHOLDS.proxyAuc) continue;
    const { file, line, col } = input.described.featureCell(0, c);
    out.push(
      warning(
        AUDIT_CODE['label-proxy'],
        `feature "${table.featureNames[c]}" alone separates ${k === 2 ? 'the two classes' : 'every pair of classes'} ` +
          `(ROC AUC ${sep.toFixed(4)} ≥ ${AUDIT_THRESHOLDS.proxyAuc})`,
        {
          file,
          position: { line, col },
          hint: 'make sure it is measured before the outcome and is not the label in another form; if it is, leave it out (data.features.exclude)',
        },
      ),
    );
  }
  return out;
}

const escapeRegExp = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

export function idFindings(input: AuditInput): Problem[] {
  const { table } = input;
  const n = table.ids.length;
  const k = table.classes.length;
  const t = AUDIT_THRESHOLDS;
  const out: Problem[] = [];
  const idAt = input.protocolAt(['data', input.protocol.data.id !== undefined ? 'id' : 'file']);
  // Ids that spell their row's class as a word.
  const words = table.classes.map((c) =>
    c.length >= 2 ? new RegExp(`(^|[^\\p{L}\\p{N}])${escapeRegExp(c)}($|[^\\p{L}])`, 'iu') : undefined,
  );
  let named = 0;
  for (let r = 0; r < n; r++) if (words[table.y[r]]?.test(table.ids[r])) named++;
  if (input.protocol.data.id !== undefined && named / n >= t.idNamesClass)
    out.push(
      note(AUDIT_CODE['id-label'], `${plural(named, 'id')} of ${n} contain their row's class name: the ids encode the label`, {
        ...idAt,
        hint: 'foldseal never reads ids as features; make sure no other tool, file name or plot order does',
      }),
    );
  // Numeric ids, or the order of rows in the file, that follow the class.
  const numeric = table.ids.every((id) => /^[+-]?\d+(\.\d+)?$/.test(id));
  if (input.protocol.data.id !== undefined && numeric) {
    const sep = pairwiseSeparation(Float64Array.from(table.ids, Number), table.y, k);
    if (sep !== null && sep >= t.orderAuc)
      out.push(
        note(AUDIT_CODE['id-label'], `the numeric ids are ordered by class (ROC AUC ${sep.toFixed(3)} ≥ ${t.orderAuc})`, {
          ...idAt,
          hint: 'ids given in collection order suggest the classes were collected at different times or places: check for a batch effect',
        }),
      );
  }
  const sep = pairwiseSeparation(
    Float64Array.from({ length: n }, (_, r) => table.rowLines[r]),
    table.y,
    k,
  );
  if (sep !== null && sep >= t.orderAuc)
    out.push(
      note(
        AUDIT_CODE['id-label'],
        `the rows of the data file are ordered by class (ROC AUC of row position ${sep.toFixed(3)} ≥ ${t.orderAuc}); ` +
          `foldseal's folds do not depend on row order`,
        { ...input.protocolAt(['data', 'file']), hint: 'a split by row position in another tool would put one class in the test part' },
      ),
    );
  return out;
}
