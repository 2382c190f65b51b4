/** Per-fold table and summary lines of a run, for the terminal. */
import type { CvResult } from '../run/cross-validate.js';
import { textTable } from './text-table.js';

const fmt = (v: number | null) => (v === null ? '—' : v.toFixed(4));

/** Test parts smaller than this make per-fold rank and correlation metrics unstable (common practice: prefer pooled values). */
export const TINY_FOLD = 10;
const POOLED_PREFERRED = ['mcc', 'roc-auc', 'kappa', 'average-precision'];

export function cvTables(cv: CvResult): string {
  const names = cv.metricNames;
  const header = ['repeat', 'fold', 'test', ...names, 'baseline'];
  const rows = cv.folds.map((f) => [
    String(f.repeat),
    String(f.fold),
    String(f.testRows),
    ...names.map((m) => fmt(f.metrics[m])),
    fmt(f.baselineAccuracy),
  ]);
  const summary = textTable(
    ['metric', 'mean', 'sd', 'pooled'],
    [
      ...names.map((m) => {
        const s = cv.summary[m];
        const counted = cv.folds.length - s.undefinedFolds;
        return [m, fmt(s.mean) + (s.undefinedFolds ? ` (${counted} of ${cv.folds.length} folds)` : ''), fmt(s.sd), fmt(s.pooled)];
      }),
      ['baseline accuracy', fmt(cv.baseline.mean), '—', fmt(cv.baseline.pooled)],
    ],
  );
  const smallest = Math.min(...cv.folds.map((f) => f.testRows));
  const unstable = names.filter((m) => POOLED_PREFERRED.includes(m));
  const tiny =
    smallest < TINY_FOLD && unstable.length
      ? `test parts hold as few as ${smallest} row${smallest === 1 ? '' : 's'}: per-fold ${unstable.join(', ')} are unstable or ` +
        `undefined there, so report their pooled values\n`
      : '';
  const folds = cv.folds.length <= 60 ? textTable(header, rows) + '\n' : `${cv.folds.length} folds (table omitted; see results.json)\n\n`;
  return (
    folds +
    summary +
    tiny +
    `baseline = always predicting the training part's most common class; largest class share ${fmt(cv.baseline.largestClassShare)}\n`
  );
}
