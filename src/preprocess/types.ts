/**
 * A preprocessing step's entry: what it is, its settings (the protocol schema's branch is
 * generated from them), its checks against the data, and fit → apply. Fit returns plain JSON
 * parameters; both are pure. A step may offer one optional capability object, `fast`, that lets
 * the fold executor fit it more cheaply with identical bits (see capability.ts).
 */
import type { ClassMoments } from '../model/class-moments.js';
import type { OptionSpec } from '../model/types.js';
import type { ProblemCode } from '../problems/codes.js';
import type { Matrix } from '../table/matrix.js';

/** One setting of a step, as JSON Schema keywords (enum for a choice). */
export type StepSetting = Omit<OptionSpec, 'type' | 'default'> & { type?: OptionSpec['type']; enum?: readonly string[] };

/** What a step's data check sees: the width of its input, the classes, and the steps before it. */
export interface StepContext {
  width: number;
  classCount: number;
  before: readonly { step: string }[];
}

/** A problem a step finds; `path` is relative to the step's settings (e.g. ['top']). */
export interface StepProblem {
  severity: 'error' | 'warning';
  code: ProblemCode;
  message: string;
  path: string[];
  hint?: string;
}

export interface TransformImpl<P = unknown, S extends object = object> {
  /** One sentence for the schema and docs/protocol.md. */
  readonly description: string;
  /** What the step does to the training part, as a methods section says it (a clause without a subject). */
  methods(settings: S): string;
  /**
   * The step's settings, each required. A step without settings is written as its bare name
   * (`- standardize`); one with settings as `- {name: {setting: value}}`.
   */
  readonly settings: Readonly<Record<keyof S & string, StepSetting>>;
  /** Whether the step fills missing cells (then missing values in the data are not an error). */
  readonly fillsMissing: boolean;
  /** Problems of the settings against the data (located under the step), and the width of its output. */
  check(step: S, ctx: StepContext): { problems: StepProblem[]; width: number };
  fit(X: Matrix, y: Int32Array, classCount: number, step: S): P;
  /**
   * `owned`: X's data is the pipeline's own temporary copy, so a step whose output has X's shape
   * may write its output over it (fresh memory is slow to touch; the arithmetic is the same).
   */
  apply(params: P, X: Matrix, owned?: boolean): Matrix;
  /**
   * The step applied to rows `rows` of X only, written into `out` (rows × X's columns): exactly
   * apply's numbers on a copy of those rows, made in the one pass that copies them.
   */
  applyRows?(params: P, X: Matrix, rows: Int32Array, out: Float64Array): Matrix;
  /** The one optional capability: how the step can be fitted faster with identical bits. */
  readonly fast?: ColumnWise<P, S> | Selection<P, S>;
}

/** A step that treats every column on its own (output column j comes from input column j only). */
export interface ColumnWise<P, S> {
  readonly kind: 'column-wise';
  /** The same fit and apply one column at a time (see by-columns.ts); its fields also cut the parameters to a subset of columns. */
  readonly column: ColumnKernel<S>;
  /** Fitted from class moments alone (see run/fit-by-moments.ts), when it can be. */
  readonly moments?: MomentStep<P, S>;
}

/** A step that keeps a subset of its input columns, chosen from one score per column. */
export interface Selection<P, S> {
  readonly kind: 'selection';
  /** The input positions kept, in output order. */
  kept(params: P): number[];
  /** The parameters chosen from every column's score (fit = fromScores(scores of each column)). */
  fromScores(scores: Float64Array, step: S): P;
  /** One column's score, from its training values v[0, n) (see feature-scores.ts). */
  scoreColumn(v: Float64Array, n: number, y: Int32Array, classCount: number, step: S, work: ScoreWork): number;
  readonly moments?: MomentStep<P, S>;
}

/** Scratch a column score reuses across columns: per-class counts, means and sums of squares, and the classes present. */
export interface ScoreWork {
  counts: Float64Array;
  mean: Float64Array;
  ss: Float64Array;
  present: readonly number[];
}

/** A step fitted from its input's class moments, which also knows the moments of its output. */
export interface MomentStep<P, S = unknown> {
  fit(m: ClassMoments, step: S): P;
  /** Class moments of apply(params, X), given those of X. */
  after(params: P, m: ClassMoments): ClassMoments;
}

/**
 * A column-wise transform on one column's training values v[0, n): the same arithmetic as its
 * whole-matrix fit and apply, in the same order, so both give identical bits.
 */
export interface ColumnKernel<S = unknown> {
  /** The parameter record's fields; each holds one number per column. */
  fields: readonly string[];
  /** Writes the column's value of each field, in `fields` order, into out. */
  fit(v: Float64Array, n: number, step: S, out: Float64Array): void;
  /** Transforms v[0, n) in place, given the column's field values. */
  apply(v: Float64Array, n: number, params: Float64Array): void;
}

/** The check of a step that keeps its width and has nothing to check. */
export function keepsWidth(_step: object, ctx: StepContext): { problems: StepProblem[]; width: number } {
  return { problems: [], width: ctx.width };
}
