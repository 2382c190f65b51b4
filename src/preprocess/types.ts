/** A transform: fit on training rows (plain JSON parameters), then apply to any rows. Pure. */
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
}

export class TransformError extends Error {
  constructor(readonly code: string, message: string, readonly hint?: string) {
    super(message);
    this.name = 'TransformError';
  }
}
