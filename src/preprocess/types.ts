/** A transform: fit on training rows (plain JSON parameters), then apply to any rows. Pure. */
import type { ClassMoments } from '../model/class-moments.js';
import type { Matrix } from '../table/matrix.js';

export interface TransformImpl<P = unknown> {
  fit(X: Matrix, y: Int32Array, classCount: number, step: any): P;
  apply(params: P, X: Matrix): Matrix;
  /** Names of the output columns given the input names (selection keeps a subset). */
  columns?(params: P, names: readonly string[]): string[];
  /** For selections: the input positions kept, in output order. */
  kept?(params: P): number[];
  /** For column-wise transforms: the same transform on a subset of the input positions. */
  restrict?(params: P, positions: readonly number[]): P;
  /** For selections: the parameters chosen from every column's score (fit = fromScores(scores of each column)). */
  fromScores?(scores: Float64Array, step: any): P;
  /** For selections: one column's score, from its training values v[0, n) (see feature-scores.ts). */
  scoreColumn?(
    v: Float64Array,
    n: number,
    y: Int32Array,
    classCount: number,
    step: any,
    counts: Float64Array,
    mean: Float64Array,
    ss: Float64Array,
    present: readonly number[],
  ): number;
  /** For column-wise transforms: the same fit and apply one column at a time (see by-columns.ts). */
  column?: ColumnKernel;
  /** For steps that learn only class moments of their input (see run/fit-by-moments.ts). */
  moments?: MomentStep<P>;
}

/** A step fitted from its input's class moments, which also knows the moments of its output. */
export interface MomentStep<P> {
  fit(m: ClassMoments, step: any): P;
  /** Class moments of apply(params, X), given those of X. */
  after(params: P, m: ClassMoments): ClassMoments;
}

/**
 * A column-wise transform on one column's training values v[0, n): the same arithmetic as its
 * whole-matrix fit and apply, in the same order, so both give identical bits.
 */
export interface ColumnKernel {
  /** The parameter record's fields; each holds one number per column. */
  fields: readonly string[];
  /** Writes the column's value of each field, in `fields` order, into out. */
  fit(v: Float64Array, n: number, step: any, out: Float64Array): void;
  /** Transforms v[0, n) in place, given the column's field values. */
  apply(v: Float64Array, n: number, params: Float64Array): void;
}
