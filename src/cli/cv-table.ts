/** Per-fold table and summary lines of a run, for the terminal. */
import type { CvResult } from '../run/cross-validate.js';
import type { RunStatistics } from '../run/statistics.js';
import type { NewRowScores } from '../reconcile/new-row-scores.js';
import { textTable } from './text-table.js';
import type { ChosenCount } from '../run/results.js';

const fmt = (v: number | null) => (v === null ? '—' : v.toFixed(4));

/** Test parts smaller than this make per-fold rank and correlation metrics unstable (common practice: prefer pooled values). */
export const TINY_FOLD = 10;
const POOLED_PREFERRED = ['mcc', 'roc-auc', 'kappa', 'average-precision'];

export function cvTables(cv: CvResult): string {
  const names = cv.metricNames;
  const tuned = cv.tuning?.settings ?? [];
  const header = ['repeat', 'fold', 'test', ...names, 'baseline', ...tuned];
  const rows = cv.folds.map((f, i) => [
    String(f.repeat),
    String(f.fold),
    String(f.testRows),
    ...names.map((m) => fmt(f.metrics[m])),
    fmt(f.baselineAccuracy),
    ...tuned.map((name) => String(cv.models[i].chosen![name])),
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
  const nested = cv.tuning
    ? `the scores above are the nested estimate: ${tuned.join(' and ')} chosen inside each outer fold, on its training rows only\n`
    : '';
  return (
    folds +
    summary +
    nested +
    tiny +
    `baseline = always predicting the training part's most common class; largest class share ${fmt(cv.baseline.largestClassShare)}\n`
  );
}

/** How often each candidate value won an outer fold, and what the refit model uses, for the terminal. */
export function tuningLines(counts: Record<string, ChosenCount[]>, metric: string, refit?: Record<string, number | string>): string {
  const lines = Object.entries(counts).map(([name, byValue]) => `  ${name}: ${byValue.map((c) => `${c.value} ×${c.folds}`).join(', ')}`);
  const after = refit
    ? `the refit model uses ${Object.entries(refit)
        .map(([k, v]) => `${k} = ${v}`)
        .join(', ')} (chosen by the same search on every row)\n`
    : '';
  return `\nchosen per outer fold (by mean inner ${metric}):\n${lines.join('\n')}\n${after}`;
}

const range = (i: [number, number] | null) => (i === null ? '—' : `${fmt(i[0])}–${fmt(i[1])}`);

/** The intervals and the permutation test of a run, for the terminal (empty when the protocol asks for none). */
export function statisticsLines(s: RunStatistics | undefined): string {
  if (!s) return '';
  const i = s.intervals;
  const pct = Math.round(i.level * 1e6) / 1e4;
  const names = Object.keys(i.metrics);
  const table = textTable(
    ['metric', 'pooled', 'bootstrap percentile', 'bootstrap BCa', 'DeLong', 'fold mean', 'corrected t', 'naive t'],
    names.map((m) => {
      const v = i.metrics[m];
      return [
        m,
        fmt(v.pooled.value),
        range(v.pooled.percentile),
        range(v.pooled.bca),
        range(v.pooled.delong),
        fmt(v.folds.mean),
        range(v.folds.corrected),
        range(v.folds.naive),
      ];
    }),
  );
  const boot = i.replicates === null ? 'no bootstrap' : `${i.replicates} stratified bootstrap replicates, seed ${i.seed}`;
  let out =
    `\n${pct} % intervals (${i.version}; ${boot}):\n` +
    table +
    'the naive t interval treats the folds as independent samples, but their training parts overlap and every row is\n' +
    'tested once per repeat, so it is too narrow; the corrected t interval (Nadeau & Bengio 2003) accounts for that\n';
  for (const note of i.notes) out += `note: ${note}\n`;
  const p = s.permutation;
  if (p) {
    const within = p.within === 'group' ? 'within groups' : 'among all rows';
    const floor = p.atLeastAsGood === 0 ? ` (= 1/(N+1), the smallest possible with ${p.count} permutations)` : '';
    out +=
      `\npermutation test (${p.metric}, mean over folds; ${p.count} permutations of the labels ${within}, seed ${p.seed}):\n` +
      `  observed ${fmt(p.observed)}; permuted: median ${fmt(p.null.median)}, 5–95 % ${fmt(p.null.q05)}–${fmt(p.null.q95)}, ` +
      `max ${fmt(p.null.max)}\n` +
      `  p = ${p.pValue.toPrecision(3)}${floor}: ${p.atLeastAsGood} permutation${p.atLeastAsGood === 1 ? '' : 's'} scored at least as well\n`;
  }
  return out;
}

/** Scores of labeled new rows (a held-back test set), for the terminal. */
export function newRowScoreLines(s: NewRowScores, label: string): string {
  const left = s['left-out'];
  const out = [
    `scored on the new rows' own labels (column "${label}"): ${s.rows} row${s.rows === 1 ? '' : 's'}` +
      (left['held-out']
        ? `; ${left['held-out']} row${left['held-out'] === 1 ? ' was' : 's were'} in the cross-validation and not scored`
        : '') +
      (left.unlabeled ? `; ${left.unlabeled} without a label` : ''),
    ...Object.entries(s.metrics).map(([m, v]) => `  ${m.padEnd(18)} ${fmt(v)}`),
  ];
  return out.join('\n') + '\n';
}
