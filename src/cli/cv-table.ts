/** Per-fold table and summary lines of a run, for the terminal. */
import type { CvResult } from '../run/cross-validate.js';
import { textTable } from './text-table.js';

const fmt = (v: number | null) => (v === null ? '—' : v.toFixed(4));

export function cvTables(cv: CvResult): string {
  const names = cv.metricNames;
  const header = ['repeat', 'fold', 'test', ...names, 'baseline'];
  const rows = cv.folds.map((f) => [String(f.repeat), String(f.fold), String(f.testRows), ...names.map((m) => fmt(f.metrics[m])), fmt(f.baselineAccuracy)]);
  const summary = textTable(
    ['metric', 'mean', 'sd', 'pooled'],
    [...names.map((m) => [m, fmt(cv.summary[m].mean), fmt(cv.summary[m].sd), fmt(cv.summary[m].pooled)]), ['baseline accuracy', fmt(cv.baseline.mean), '—', fmt(cv.baseline.pooled)]],
  );
  const folds = cv.folds.length <= 60 ? textTable(header, rows) + '\n' : `${cv.folds.length} folds (table omitted; see results.json)\n\n`;
  return folds + summary + `baseline = always predicting the training part's most common class; largest class share ${fmt(cv.baseline.largestClassShare)}\n`;
}
