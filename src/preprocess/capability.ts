/** What the pipeline and the fold executor read from a step's optional capability object. Pure. */
import type { TransformImpl } from './types.js';

type AnyStep = TransformImpl<any, any>;

export function selectionOf(impl: AnyStep) {
  return impl.fast?.kind === 'selection' ? impl.fast : undefined;
}

export function columnKernelOf(impl: AnyStep) {
  return impl.fast?.kind === 'column-wise' ? impl.fast.column : undefined;
}

export function momentsOf(impl: AnyStep) {
  return impl.fast?.moments;
}

/** Names of the output columns: a selection's kept ones, every other step's input names. */
export function outputColumns(impl: AnyStep, params: unknown, names: readonly string[]): string[] {
  const selection = selectionOf(impl);
  return selection ? selection.kept(params).map((j) => names[j]) : [...names];
}

/** A column-wise step's parameters cut to the input positions given (each field holds one number per column). */
export function restrictParams(impl: AnyStep, params: unknown, positions: readonly number[]): unknown {
  const kernel = columnKernelOf(impl)!;
  const record = params as Record<string, number[]>;
  const out: Record<string, number[]> = {};
  for (const field of kernel.fields) out[field] = positions.map((j) => record[field][j]);
  return out;
}
