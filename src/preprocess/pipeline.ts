/** Fit the protocol's steps in order on the training rows, carrying the feature names along. */
import type { PreprocessStep } from '../protocol/types.js';
import type { Matrix } from '../table/matrix.js';
import { transforms } from './registry.js';
import { TransformError } from './types.js';

export interface FittedStep {
  step: PreprocessStep;
  params: unknown;
}

export interface FittedPipeline {
  steps: FittedStep[];
  /** Feature names going into the model. */
  columns: string[];
}

export function fitPipeline(steps: readonly PreprocessStep[], X: Matrix, y: Int32Array, classCount: number, names: readonly string[]): { pipeline: FittedPipeline; X: Matrix } {
  let current = X;
  let columns = [...names];
  const fitted: FittedStep[] = [];
  for (const step of steps) {
    const impl = transforms[step.step];
    const params = impl.fit(current, y, classCount, step);
    current = impl.apply(params, current);
    if (impl.columns) columns = impl.columns(params, columns);
    fitted.push({ step, params });
  }
  // Validation already guarantees finite (or imputed) input; only transforms can create non-finite values.
  if (steps.length) assertFinite(current, columns);
  return { pipeline: { steps: fitted, columns }, X: current };
}

export function applyPipeline(p: FittedPipeline, X: Matrix): Matrix {
  let current = X;
  for (const s of p.steps) current = transforms[s.step.step].apply(s.params, current);
  if (p.steps.length) assertFinite(current, p.columns);
  return current;
}

function assertFinite(X: Matrix, columns: readonly string[]): void {
  for (let k = 0; k < X.data.length; k++) {
    if (!Number.isFinite(X.data[k])) {
      const what = X.data[k] !== X.data[k] ? 'a missing value' : 'an infinite value';
      throw new TransformError('non-finite-feature', `feature "${columns[k % X.cols]}" has ${what} after preprocessing (row ${Math.floor(k / X.cols) + 1} of the part)`, 'add an impute step, or check the input for overflow');
    }
  }
}
