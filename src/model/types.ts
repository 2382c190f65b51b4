/**
 * One fit → predict interface for every model (after Buitinck et al. 2013, "API design for
 * machine learning software"): fit returns plain JSON-able parameters, predict maps rows to
 * class probabilities. Both are pure and deterministic.
 */
import type { ProblemCode } from '../problems/codes.js';
import type { Matrix } from '../table/matrix.js';
import type { ClassMoments } from './class-moments.js';

export interface FitContext {
  /** Number of classes overall; classes absent from the training part get probability 0. */
  classCount: number;
}

/** One option of a model, as JSON Schema (2020-12) keywords: the single place its type, range and default live. */
export interface OptionSpec {
  description: string;
  type: 'number' | 'integer' | 'object' | 'string';
  /** For a string option: the values it takes. */
  enum?: string[];
  minimum?: number;
  maximum?: number;
  exclusiveMinimum?: number;
  default?: number | string;
  additionalProperties?: { type: 'number'; minimum?: number; maximum?: number };
}

/** What a model's check sees: the classes and the smallest training part of the split (rows). */
export interface ModelData {
  classes: readonly string[];
  smallestTrain: number;
}

/** A problem a model finds in its options against the data; `path` is under `model.options` (`key`: at the key itself). */
export interface ModelProblem {
  code: ProblemCode;
  message: string;
  path: string[];
  key?: boolean;
  hint?: string;
}

export interface ModelImpl<P = unknown> {
  /** One sentence for the schema and docs/protocol.md. */
  readonly description: string;
  /** The model as a methods section names it, with its options filled in (defaults included). */
  methods(options: Readonly<Record<string, unknown>>): string;
  /** The options `model.options` may set; the protocol schema's branch for this kind is generated from them. */
  readonly options: Readonly<Record<string, OptionSpec>>;
  /**
   * Fit on training rows (row-major X, class codes y). Options are the protocol's `model.options`
   * with every default filled in (registry.ts).
   */
  fit(X: Matrix, y: Int32Array, options: Record<string, unknown>, ctx: FitContext): P;
  /** Probabilities, row-major rows × classCount; each row sums to 1. */
  predict(params: P, X: Matrix): Float64Array;
  /** Problems of the options (every default filled in) against the data. */
  check(options: Record<string, unknown>, data: ModelData): ModelProblem[];
  /** The one optional object of further capabilities; the fold executor and the runner read it. */
  readonly capabilities?: ModelCapabilities<P>;
}

export interface ModelCapabilities<P> {
  /**
   * For models that learn from their training rows only through class moments: the same fit
   * from the moments. `fit` must equal fromMoments(classMoments(X, y)); the runner then fits
   * folds from merged per-fold moments (see class-moments.ts).
   */
  fromMoments?(moments: ClassMoments, options: Record<string, unknown>, ctx: FitContext): P;
  /**
   * The probabilities of rows which[i] of X under models[modelOf[i]], without copying the rows
   * out — every fold's held-out rows in one call. Equals predict per model.
   */
  predictRows?(models: P[], X: Matrix, which: Int32Array, modelOf: Int32Array): Float64Array;
  /**
   * Fitting is cheap next to predicting (the model keeps its training rows): a fold's test rows
   * may then be predicted in parts on several threads, each fitting the fold again.
   */
  cheapFit?: true;
  /** Remarks on a fitted model worth a warning (e.g. every distance tied). */
  notes?(params: P): string[];
  /**
   * The work of one fold on a table of `rows` × `cols`, in units of about 60 ns (the default,
   * rows × cols, fits logistic regression): whether fold threads pay for their start-up.
   */
  work?(rows: number, cols: number): number;
  /**
   * The parameters hold the training rows themselves (after the fold's pipeline) and their
   * classes. models.json then records which rows of the run's table they were instead of a
   * copy (the data file's hash seals them; see reconcile/training-rows.ts), and `apply` puts
   * them back: `without` is the rest of the parameters, `with` rebuilds the whole from it and
   * the rows, `rows` hands out the rows and classes exactly as predict reads them.
   */
  keepsRows?: {
    without(params: P): Record<string, unknown>;
    with(rest: Record<string, unknown>, X: Matrix, y: Int32Array): P;
    rows(params: P): { X: Float64Array; y: Int32Array };
  };
}

export { FitError } from '../problems/problem.js';

/** The check of a model with nothing to check against the data. */
export const noChecks = (): ModelProblem[] => [];

/**
 * Checks of a class-keyed option (an option of type `object`: class label → number): every
 * class has a value, no other key is there, and (when `total` is given) the values sum to it.
 */
export function classKeyedProblems(name: string, map: Record<string, number>, classes: readonly string[], total?: number): ModelProblem[] {
  const out: ModelProblem[] = [];
  for (const c of classes)
    if (!(c in map)) out.push({ code: 'priors-incomplete', message: `${name} give no value for class "${c}"`, path: [name] });
  for (const c of Object.keys(map))
    if (!classes.includes(c))
      out.push({ code: 'unknown-class', message: `${name} name "${c}", which is not a class`, path: [name, c], key: true });
  const sum = Object.values(map).reduce((a, b) => a + b, 0);
  if (total !== undefined && Math.abs(sum - total) > 1e-9)
    out.push({ code: 'priors-sum', message: `${name} sum to ${sum}, not ${total}`, path: [name] });
  return out;
}

export function classCounts(y: Int32Array, classCount: number): Float64Array {
  const c = new Float64Array(classCount);
  for (let i = 0; i < y.length; i++) c[y[i]]++;
  return c;
}

/**
 * Turns per-class log scores into probabilities with log-sum-exp, in place (the scores are the
 * caller's scratch; each is read before it is written over); -Infinity scores give exactly 0.
 */
export function softmaxRows(scores: Float64Array, rows: number, k: number): Float64Array {
  const out = scores;
  for (let r = 0; r < rows; r++) {
    const o = r * k;
    let max = -Infinity;
    for (let c = 0; c < k; c++) if (scores[o + c] > max) max = scores[o + c];
    let sum = 0;
    for (let c = 0; c < k; c++) {
      const e = scores[o + c] === -Infinity ? 0 : Math.exp(scores[o + c] - max);
      out[o + c] = e;
      sum += e;
    }
    for (let c = 0; c < k; c++) out[o + c] /= sum;
  }
  return out;
}

/**
 * Naive Bayes class probabilities: for each class present in training, score(row, class, prior)
 * adds the row's log-likelihood to the log prior it starts from; classes absent from training
 * score -Infinity (probability 0).
 */
export function naiveBayesPosteriors(
  rows: number,
  logPrior: readonly (number | null)[],
  score: (row: number, c: number, start: number) => number,
): Float64Array {
  const k = logPrior.length;
  const scores = new Float64Array(rows * k);
  for (let c = 0; c < k; c++) {
    const lp = logPrior[c];
    for (let r = 0; r < rows; r++) scores[r * k + c] = lp === null ? -Infinity : score(r, c, lp);
  }
  return softmaxRows(scores, rows, k);
}

/**
 * An option's or step setting's schema with the tuning form added: a scalar as before, or a list
 * of at least two distinct candidate values, each valid on its own (a `tune` section then picks one per fold).
 */
export function tunable(spec: Record<string, unknown>): Record<string, unknown> {
  if (spec.type === 'object') return spec;
  const { description, default: fallback, ...value } = spec;
  return {
    description: `${description} A list of candidate values is tuned inside the folds (see tune).`,
    ...(fallback !== undefined ? { default: fallback } : {}),
    oneOf: [value, { type: 'array', minItems: 2, uniqueItems: true, items: value }],
  };
}
