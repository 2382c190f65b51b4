/**
 * Fitting a pipeline that starts with column-wise steps and then a selection, one column at a
 * time. Those steps and the selection's scores treat every column on its own, so each column's
 * training values are gathered once into a small buffer that stays in cache, fitted, transformed
 * and scored there, and only the columns the selection keeps are carried on. Per column the
 * arithmetic and its order are those of the whole-matrix fit (a test holds the two bit for bit):
 * a 20,000-gene table that keeps 100 genes never materializes 20,000 standardized columns.
 */
import type { PreprocessStep } from './registry.js';
import { takeRows, type Matrix } from '../table/matrix.js';
import { presentClasses } from './feature-scores.js';
import { assertFinite, fitPipeline, type FittedPipeline, type FittedStep } from './pipeline.js';
import { transforms } from './registry.js';
import { FitError } from '../problems/problem.js';
import type { ColumnKernel, Selection } from './types.js';
import { columnKernelOf, selectionOf } from './capability.js';

interface ColumnPlan {
  prefix: { step: PreprocessStep; kernel: ColumnKernel<any> }[];
  at: number;
  selection: Selection<unknown, any>;
}

function columnPlan(steps: readonly PreprocessStep[]): ColumnPlan | undefined {
  const at = steps.findIndex((step) => selectionOf(transforms[step.step]));
  if (at < 0) return undefined;
  const selection = selectionOf(transforms[steps[at].step])!;
  const prefix: ColumnPlan['prefix'] = [];
  for (const step of steps.slice(0, at)) {
    const kernel = columnKernelOf(transforms[step.step]);
    if (!kernel) return undefined;
    prefix.push({ step, kernel });
  }
  return { prefix, at, selection };
}

/** Whether fitting `steps` goes column by column (and so wants the table in column-major order). */
export function fitsByColumns(steps: readonly PreprocessStep[]): boolean {
  return columnPlan(steps) !== undefined;
}

/** The same cells, column-major: out[j * rows + r] = X(r, j). */
export function columnMajor(
  X: Matrix,
  out: Float64Array<ArrayBufferLike> = new Float64Array(X.rows * X.cols),
): Float64Array<ArrayBufferLike> {
  const { rows, cols, data } = X;
  for (let r = 0; r < rows; r++) {
    const b = r * cols;
    for (let j = 0; j < cols; j++) out[j * rows + r] = data[b + j];
  }
  return out;
}

/**
 * Fit `steps` on the training `rows` of source. `columns` is source in column-major order
 * (see columnMajor); without it, or when the steps do not allow it, the whole-matrix fit runs.
 */
export function fitPipelineOnRows(
  steps: readonly PreprocessStep[],
  source: Matrix,
  rows: Int32Array,
  y: Int32Array,
  classCount: number,
  names: readonly string[],
  columns?: Float64Array,
  /** Where the training rows' copy goes (a buffer of rows.length × source.cols), when not fresh memory. */
  into?: (length: number) => Float64Array,
): { pipeline: FittedPipeline; X: Matrix } {
  const plan = columns ? columnPlan(steps) : undefined;
  if (plan && columns) {
    try {
      return byColumns(steps, plan, source, columns, rows, y, classCount, names);
    } catch (e) {
      // A kernel cannot name the column or row that failed: the whole-matrix fit below fails
      // the same way and says where.
      if (!(e instanceof FitError)) throw e;
    }
  }
  const copy = takeRows(source, rows, into?.(rows.length * source.cols));
  return fitPipeline(steps, copy, y, classCount, names, true);
}

function byColumns(
  steps: readonly PreprocessStep[],
  plan: ColumnPlan,
  source: Matrix,
  columns: Float64Array,
  rows: Int32Array,
  y: Int32Array,
  classCount: number,
  names: readonly string[],
): { pipeline: FittedPipeline; X: Matrix } {
  const n = rows.length;
  const width = source.cols;
  const v = new Float64Array(n);
  const gather = (j: number) => {
    const base = j * source.rows;
    for (let i = 0; i < n; i++) v[i] = columns[base + rows[i]];
  };
  const counts = new Float64Array(classCount);
  for (let i = 0; i < n; i++) counts[y[i]]++;
  const present = presentClasses(counts);
  const work = { counts, mean: new Float64Array(classCount), ss: new Float64Array(classCount), present };
  // values[t][f * width + j]: field f of step t's parameters for column j.
  const values = plan.prefix.map(({ kernel }) => new Float64Array(kernel.fields.length * width));
  const one = plan.prefix.map(({ kernel }) => new Float64Array(kernel.fields.length));
  const scores = new Float64Array(width);
  const selectStep = steps[plan.at];
  const { scoreColumn } = plan.selection;
  for (let j = 0; j < width; j++) {
    gather(j);
    for (let t = 0; t < plan.prefix.length; t++) {
      const { step, kernel } = plan.prefix[t];
      const p = one[t];
      kernel.fit(v, n, step, p);
      for (let f = 0; f < p.length; f++) values[t][f * width + j] = p[f];
      kernel.apply(v, n, p);
    }
    scores[j] = scoreColumn(v, n, y, classCount, selectStep, work);
  }
  const fitted: FittedStep[] = plan.prefix.map(({ step, kernel }, t) => ({
    step,
    params: Object.fromEntries(kernel.fields.map((field, f) => [field, Array.from(values[t].subarray(f * width, (f + 1) * width))])),
  }));
  const chosen = plan.selection.fromScores(scores, selectStep);
  const keep = plan.selection.kept(chosen);
  // The kept columns again, through the same fitted kernels, into a row-major training matrix.
  const current = new Float64Array(n * keep.length);
  keep.forEach((j, q) => {
    gather(j);
    plan.prefix.forEach(({ kernel }, t) => {
      const p = one[t];
      for (let f = 0; f < p.length; f++) p[f] = values[t][f * width + j];
      kernel.apply(v, n, p);
    });
    for (let i = 0; i < n; i++) current[i * keep.length + q] = v[i];
  });
  const rest = fitPipeline(
    steps.slice(plan.at + 1),
    { rows: n, cols: keep.length, data: current },
    y,
    classCount,
    keep.map((j) => names[j]),
    true,
  );
  if (rest.pipeline.steps.length === 0) assertFinite(rest.X, rest.pipeline.columns);
  return {
    pipeline: { steps: [...fitted, { step: selectStep, params: chosen }, ...rest.pipeline.steps], columns: rest.pipeline.columns },
    X: rest.X,
  };
}
