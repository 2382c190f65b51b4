/** Fit the protocol's steps in order on the training rows, carrying the feature names along. */
import type { PreprocessStep } from './registry.js';
import type { Matrix } from '../table/matrix.js';
import { takeCells, takeCols, takeRows } from '../table/matrix.js';
import { transforms } from './registry.js';
import { outputColumns, restrictParams, selectionOf } from './capability.js';
import { FitError } from '../problems/problem.js';

export interface FittedStep {
  step: PreprocessStep;
  params: unknown;
}

export interface FittedPipeline {
  steps: FittedStep[];
  /** Feature names going into the model. */
  columns: string[];
  /** When set, the pipeline reads only these input feature positions (see prunePipeline). */
  input?: number[];
}

export function fitPipeline(
  steps: readonly PreprocessStep[],
  X: Matrix,
  y: Int32Array,
  classCount: number,
  names: readonly string[],
  /** X is the caller's temporary copy: steps may overwrite it. */
  owned = false,
): { pipeline: FittedPipeline; X: Matrix } {
  let current = X;
  let mine = owned;
  let columns = [...names];
  const fitted: FittedStep[] = [];
  for (const step of steps) {
    const impl = transforms[step.step];
    const params = impl.fit(current, y, classCount, step);
    const next = impl.apply(params, current, mine);
    // A step's new array is this pipeline's own from then on.
    mine ||= next.data !== current.data;
    current = next;
    columns = outputColumns(impl, params, columns);
    fitted.push({ step, params });
  }
  // Validation already guarantees finite (or imputed) input; only transforms can create non-finite values.
  if (steps.length) assertFinite(current, columns);
  return { pipeline: { steps: fitted, columns }, X: current };
}

/**
 * `rows`: apply to just these rows of X (read straight from X, no copy of unused columns);
 * `into`: where their copy goes (a buffer of the given length), when not fresh memory.
 */
export function applyPipeline(p: FittedPipeline, X: Matrix, rows?: Int32Array, into?: (length: number) => Float64Array): Matrix {
  // A first step that can read the rows straight from X makes their copy itself, in the same pass.
  const first = rows && !p.input && p.steps.length ? p.steps[0] : undefined;
  const impl = first && transforms[first.step.step];
  const fused = impl?.applyRows !== undefined;
  let current = fused
    ? impl.applyRows!(first!.params, X, rows!, into?.(rows!.length * X.cols) ?? new Float64Array(rows!.length * X.cols))
    : rows
      ? p.input
        ? takeCells(X, rows, Int32Array.from(p.input), into?.(rows.length * p.input.length))
        : takeRows(X, rows, into?.(rows.length * X.cols))
      : p.input
        ? takeCols(X, Int32Array.from(p.input))
        : X;
  // A copy made here is this call's own: the steps may write over it.
  let mine = current !== X;
  for (const s of fused ? p.steps.slice(1) : p.steps) {
    const next = transforms[s.step.step].apply(s.params, current, mine);
    mine ||= next.data !== current.data;
    current = next;
  }
  if (p.steps.length) assertFinite(current, p.columns);
  return current;
}

export function assertFinite(X: Matrix, columns: readonly string[]): void {
  for (let k = 0; k < X.data.length; k++) {
    if (!Number.isFinite(X.data[k])) {
      const what = X.data[k] !== X.data[k] ? 'a missing value' : 'an infinite value';
      throw new FitError(
        'non-finite-feature',
        `feature "${columns[k % X.cols]}" has ${what} after preprocessing (row ${Math.floor(k / X.cols) + 1} of the part)`,
        'add an impute step, or check the input for overflow',
      );
    }
  }
}

/**
 * The same pipeline, reading only the input columns that survive every selection: column-wise
 * steps are cut to those columns and the selections drop out. Predictions are bit-identical
 * (each kept column goes through the same arithmetic), while a 20,000-feature pipeline that keeps
 * 100 stores and applies 100 columns' parameters.
 */
export function prunePipeline(p: FittedPipeline, inputWidth: number): FittedPipeline {
  const shape = (s: FittedStep) => transforms[s.step.step].fast?.kind;
  if (!p.steps.some((s) => shape(s) === 'selection')) return p;
  // A transform with only fit and apply (not column-wise) cannot be cut to the survivors:
  // the pipeline is then kept whole, which is correct, only larger.
  if (p.steps.some((s) => shape(s) === undefined)) return p;
  // Original positions present at the input of each step, and at the end.
  const inputs: Int32Array[] = [];
  let current = Int32Array.from({ length: inputWidth }, (_, j) => j);
  for (const s of p.steps) {
    inputs.push(current);
    const selection = selectionOf(transforms[s.step.step]);
    if (selection) current = Int32Array.from(selection.kept(s.params), (k) => current[k]);
  }
  const survives = new Uint8Array(inputWidth);
  for (const j of current) survives[j] = 1;
  const steps: FittedStep[] = [];
  p.steps.forEach((s, t) => {
    const impl = transforms[s.step.step];
    if (selectionOf(impl)) return;
    const positions: number[] = [];
    inputs[t].forEach((orig, k) => {
      if (survives[orig]) positions.push(k);
    });
    steps.push({ step: s.step, params: restrictParams(impl, s.params, positions) });
  });
  // Selections keep input order, so the survivors' original order is the model's column order.
  return { steps, columns: p.columns, input: Array.from(current) };
}
