/** results.json: the plain data of one run (the signed manifest wraps it). Pure. */
import type { Problem } from '../problems/problem.js';
import { isPinned, type Protocol } from '../protocol/types.js';
import type { Assignment } from '../split/assignment.js';
import type { Table } from '../table/table.js';
import { splitRules } from '../split/registry.js';
import type { CvResult } from './cross-validate.js';
import { statisticsJson, type RunStatistics } from './statistics.js';
import type { NewRowScores } from '../reconcile/new-row-scores.js';
import type { FoldSearch } from './nested.js';
import { asWritten } from '../protocol/grid.js';
import type { TuningResult } from './cross-validate.js';

/** One value of a tuned setting and the number of outer folds that chose it. */
export interface ChosenCount {
  value: number | string;
  folds: number;
}

/** How often each value of each tuned setting won an outer fold (selection stability), values in listed order. */
export function chosenCounts(p: Pick<Protocol, 'grid'>, t: TuningResult): Record<string, ChosenCount[]> {
  return Object.fromEntries(
    p.grid.map((g) => [
      g.name,
      g.values.map((value) => ({ value, folds: t.folds.filter((f) => t.candidates[f.chosen][g.name] === value).length })),
    ]),
  );
}

/** A command model's program, the hashes of its files and what it reported as its runtime versions (each distinct report once). */
function commandFacts(p: Protocol, cv: CvResult): Record<string, unknown> {
  const c = p.model.command;
  if (!c) return {};
  const reports = new Map<string, unknown>();
  for (const m of cv.models) {
    const v = (m.model as { versions?: unknown }).versions ?? null;
    reports.set(JSON.stringify(v), v);
  }
  return { command: { run: c.run, files: c.files, 'time-limit': c.timeLimit, versions: [...reports.values()] } };
}

function tuningJson(p: Protocol, t: TuningResult, refit: FoldSearch | undefined): Record<string, unknown> {
  const tune = p.tune!;
  const split = tune.split;
  return {
    estimate: 'nested',
    'inner-split': {
      rule: split.rule,
      folds: split.folds,
      repeats: split.repeats,
      seed: split.seed ?? null,
      assign: split.assign,
      ...(splitRules[split.rule].uses.testFraction ? { 'test-fraction': split.testFraction } : {}),
    },
    metric: tune.metric,
    prefer: tune.prefer.map((q) => ({ [q.name]: q.order })),
    candidates: t.candidates,
    folds: t.folds.map((f) => ({ repeat: f.repeat, fold: f.fold, chosen: t.candidates[f.chosen], 'inner-scores': f.scores })),
    'chosen-counts': chosenCounts(p, t),
    refit: refit ? { chosen: t.candidates[refit.chosen], 'inner-scores': refit.scores } : null,
  };
}

export const RESULTS_VERSION = 1;

export interface ResultsInput {
  protocol: Protocol;
  protocolSha256: string;
  dataSha256: string;
  joined?: { 'data-only': number; 'sheet-only': number };
  filtered?: { before: number; after: number };
  table: Table;
  assignment: Assignment;
  assignmentSha256: string;
  cv: CvResult;
  files: Record<string, string>;
  warnings: Problem[];
  /** Intervals and the permutation test, when the protocol asks for them. */
  statistics?: RunStatistics;
  /** Scores of labeled new rows (a held-back test set). */
  newRowScores?: NewRowScores;
  /** The search on every row behind a tuned protocol's refit model. */
  refitSearch?: FoldSearch;
}

export function buildResults(r: ResultsInput): Record<string, unknown> {
  const { protocol: p, table, cv } = r;
  const counts = new Array<number>(table.classes.length).fill(0);
  for (const c of table.y) counts[c]++;
  const split = isPinned(p.split)
    ? { version: r.assignment.version, pinned: p.split.pinned.file, 'pinned-sha256': p.split.pinned.sha256 }
    : {
        version: r.assignment.version,
        rule: p.split.rule,
        seed: p.split.seed ?? null,
        assign: p.split.assign,
        ...(splitRules[p.split.rule].uses.testFraction ? { 'test-fraction': p.split.testFraction } : {}),
      };
  return {
    'foldseal-results': RESULTS_VERSION,
    protocol: { name: p.name, sha256: r.protocolSha256 },
    data: {
      sha256: r.dataSha256,
      ...(p.data.layout !== 'samples-in-rows' ? { layout: p.data.layout } : {}),
      ...(p.data.samples
        ? { samples: { sha256: p.data.samples.sha256, 'left-out': r.joined ?? { 'data-only': 0, 'sheet-only': 0 } } }
        : {}),
      ...(p.data.where
        ? { where: { columns: p.data.where, 'rows-before': r.filtered?.before ?? null, 'rows-after': table.ids.length } }
        : {}),
      ...(p.data.classes ? { 'class-map': p.data.classes } : {}),
      rows: table.ids.length,
      features: table.featureNames,
      classes: table.classes,
      'class-counts': counts,
    },
    split: { ...split, folds: r.assignment.folds, repeats: r.assignment.repeats, 'assignment-sha256': r.assignmentSha256 },
    model: { kind: p.model.kind, options: asWritten(p).options, ...commandFacts(p, cv) },
    preprocess: p.preprocess.map((s) => s.step),
    classes: cv.classes,
    positive: cv.classes[cv.positive],
    metrics: cv.metricNames,
    folds: cv.folds.map((f) => ({
      repeat: f.repeat,
      fold: f.fold,
      'train-rows': f.trainRows,
      'test-rows': f.testRows,
      'test-class-counts': f.testClassCounts,
      metrics: f.metrics,
      'baseline-accuracy': f.baselineAccuracy,
      confusion: f.confusion,
    })),
    summary: Object.fromEntries(
      Object.entries(cv.summary).map(([m, s]) => [m, { mean: s.mean, sd: s.sd, pooled: s.pooled, 'undefined-folds': s.undefinedFolds }]),
    ),
    baseline: {
      'accuracy-mean': cv.baseline.mean,
      'accuracy-pooled': cv.baseline.pooled,
      'largest-class-share': cv.baseline.largestClassShare,
    },
    ...(cv.tuning ? { tuning: tuningJson(p, cv.tuning, r.refitSearch) } : {}),
    ...(r.statistics ? { statistics: statisticsJson(r.statistics) } : {}),
    ...(r.newRowScores ? { 'new-rows': r.newRowScores } : {}),
    files: r.files,
    warnings: r.warnings.map((w) => w.message),
  };
}
