/** The protocol after schema validation, with every documented default filled in. */
import { splitRules } from '../split/registry.js';
import type { RuleSplit, SplitRule } from '../split/types.js';
export type { AssignMode, RuleSplit, SplitRule } from '../split/types.js';
export type { ModelKind } from '../model/registry.js';
import type { ModelKind } from '../model/registry.js';
export type { MetricName } from '../metric/registry.js';
import type { MetricName } from '../metric/registry.js';
export type ReconcileRule = 'mean-probability' | 'majority-vote' | 'refit';
export type TieRule = 'mean-probability' | 'abstain' | 'class-order';

export type { PreprocessStep } from '../preprocess/registry.js';
import type { PreprocessStep } from '../preprocess/registry.js';

export interface HashedFile {
  file: string;
  sha256: string;
}

/** A command model's program (docs/command-models.md): run only with the user's explicit consent. */
export interface CommandSpec {
  /** The argument list, no shell; `fit FOLDER` or `predict FOLDER` is appended. */
  run: string[];
  /** Files the program depends on, hashed like the data. */
  files: HashedFile[];
  /** Seconds per fit or prediction. */
  timeLimit: number;
}

export interface PinnedSplit {
  pinned: HashedFile;
}

export interface Protocol {
  foldseal: 1;
  name: string;
  description?: string;
  final: boolean;
  data: {
    file: string;
    sha256: string;
    format?: 'csv' | 'tsv';
    layout: DataLayout;
    /** A sample sheet joined by id: label, group and covariates (never features). */
    samples?: SampleSheet;
    id?: string;
    label: string;
    positive?: string;
    group?: string;
    features?: string[] | { exclude: string[] };
    missing: string[];
    where?: Record<string, string[]>;
    classes?: Record<string, string[]>;
  };
  split: RuleSplit | PinnedSplit;
  preprocess: PreprocessStep[];
  model: { kind: ModelKind; options: Record<string, unknown>; command?: CommandSpec };
  reconcile: { rule: ReconcileRule; tie?: TieRule; newRows?: HashedFile & { id?: string; layout: DataLayout } };
  metrics: MetricName[];
  /**
   * Settings given as lists of candidate values (model options and step settings). The
   * protocol's preprocess and model carry each one's first value; a fit of a tuned protocol
   * substitutes a candidate's values (protocol/grid.ts). Empty when nothing is tuned.
   */
  grid: TunedSetting[];
  /** Nested cross-validation: the inner split and how the winning candidate is picked (absent: no tuning). */
  tune?: TuneSettings;
  /** Intervals and the permutation test (docs/resample-spec.md); absent when the protocol has no statistics section. */
  statistics?: StatisticsSettings;
  verify: { tolerance: number };
}

/** One tuned setting: its name in the protocol (`model.k`, `select.top`), where it sits, and its candidate values as listed. */
export interface TunedSetting {
  name: string;
  target: { step: number; setting: string } | { option: string };
  values: (number | string)[];
}

/** Ties on the inner score go to the candidate whose value of `name` comes first in this order. */
export type PreferOrder = 'smallest' | 'largest' | 'first-listed';

export interface TuneSettings {
  /** The inner split, applied to each outer training part (docs/split-spec.md §9); the seed defaults to the outer one. */
  split: RuleSplit;
  metric: MetricName;
  /** The tie order: every tuned setting once. */
  prefer: { name: string; order: PreferOrder }[];
}

export type DataLayout = 'samples-in-rows' | 'features-in-rows';

export interface SampleSheet {
  file: string;
  sha256: string;
  format?: 'csv' | 'tsv';
  unmatched: 'error' | 'drop';
}

export interface StatisticsSettings {
  level: number;
  bootstrap?: { replicates: number; seed: number };
  permutation?: { count: number; seed: number; metric: MetricName; within: 'all' | 'group' };
}

export const DEFAULT_METRICS: MetricName[] = ['accuracy', 'balanced-accuracy', 'roc-auc', 'mcc', 'log-loss'];
export const DEFAULT_MISSING = ['', 'NA', 'NaN'];

export function isPinned(split: Protocol['split']): split is PinnedSplit {
  return 'pinned' in split;
}

/** Rules whose assignment draws SHA-256 keys from the seed. */
export function ruleNeedsSeed(rule: SplitRule): boolean {
  return splitRules[rule].uses.seed;
}

/**
 * Whether only fold 1 is a test part (fold 2 trains): the holdout rule, and a pinned split of a
 * `final: true` protocol, whose fold 1 holds the sealed rows — testing fold 2 would train on them.
 */
export function testsFoldOneOnly(p: Pick<Protocol, 'split' | 'final'>): boolean {
  return isPinned(p.split) ? p.final : splitRules[p.split.rule].tests === 'fold-1';
}

/** The positive class's code: data.positive, else the last class in byte order. */
export function positiveClass(p: Pick<Protocol, 'data'>, classes: readonly string[]): number {
  return p.data.positive !== undefined ? classes.indexOf(p.data.positive) : classes.length - 1;
}
