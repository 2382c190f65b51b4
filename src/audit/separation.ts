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
      // Every row in the pair (two classes, no NaN): the scores as they are (aucOf only reads them).
      const s = n === y.length ? score : new Float64Array(n);
      const pos = new Uint8Array(n);
      for (let i = 0, k = 0; i < y.length; i++) {
        if ((y[i] === a || y[i] === b) && score[i] === score[i]) {
          if (s !== score) s[k] = score[i];
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

/** Buckets of the screen below (counts reused across calls on one thread would save little: 8 KB). */
const SCREEN_BUCKETS = 1024;

/**
 * Whether pairwiseSeparation(score, y, classes) can be at least `threshold`, decided in one pass
 * per class pair without sorting: the pair's values are put in equal-width buckets between their
 * minimum and maximum (a monotone map, so a positive in a higher bucket than a negative is
 * certainly above it). Pairs in different buckets are then counted exactly and pairs sharing a
 * bucket are the only unknowns, so the AUC lies in [L, L + S]; when for some class pair both
 * AUC and 1 − AUC must stay below the threshold, the answer is no. True means "maybe": the exact
 * value is then needed. Never false when the exact value reaches the threshold.
 */
export function mayReachSeparation(score: Float64Array, y: Int32Array, classes: number, threshold: number): boolean {
  const pos = new Float64Array(SCREEN_BUCKETS);
  const neg = new Float64Array(SCREEN_BUCKETS);
  for (let a = 0; a < classes; a++) {
    for (let b = a + 1; b < classes; b++) {
      let lo = Number.POSITIVE_INFINITY;
      let hi = Number.NEGATIVE_INFINITY;
      let n1 = 0;
      let n0 = 0;
      for (let i = 0; i < y.length; i++) {
        const v = score[i];
        if ((y[i] !== a && y[i] !== b) || v !== v) continue;
        if (v < lo) lo = v;
        if (v > hi) hi = v;
        if (y[i] === a) n1++;
        else n0++;
      }
      // A class without values leaves the pair out, as the exact measure does.
      if (n1 === 0 || n0 === 0) continue;
      // All values equal: AUC ½ exactly.
      if (lo === hi) {
        if (0.5 < threshold) return false;
        continue;
      }
      if (!Number.isFinite(lo) || !Number.isFinite(hi)) return true;
      const scale = SCREEN_BUCKETS / (hi - lo);
      // A range past the largest double: no scale to bucket by.
      if (!(scale > 0)) return true;
      pos.fill(0);
      neg.fill(0);
      for (let i = 0; i < y.length; i++) {
        const v = score[i];
        if ((y[i] !== a && y[i] !== b) || v !== v) continue;
        const k = Math.min(SCREEN_BUCKETS - 1, Math.floor((v - lo) * scale));
        if (y[i] === a) pos[k]++;
        else neg[k]++;
      }
      let below = 0;
      let certain = 0;
      let shared = 0;
      for (let k = 0; k < SCREEN_BUCKETS; k++) {
        certain += pos[k] * below;
        shared += pos[k] * neg[k];
        below += neg[k];
      }
      const pairs = n1 * n0;
      const aucLow = certain / pairs;
      const aucHigh = (certain + shared) / pairs;
      if (Math.max(aucHigh, 1 - aucLow) < threshold) return false;
    }
  }
  return true;
}

export function proxyFindings(input: AuditInput): Problem[] {
  const { table } = input;
  const { rows, cols, data } = table.X;
  const k = table.classes.length;
  const column = new Float64Array(rows);
  const out: Problem[] = [];
  for (let c = 0; c < cols; c++) {
    for (let r = 0; r < rows; r++) column[r] = data[r * cols + c];
    if (!mayReachSeparation(column, table.y, k, AUDIT_THRESHOLDS.proxyAuc)) continue;
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
