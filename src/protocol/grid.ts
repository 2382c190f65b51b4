/**
 * Tuning grids: a model option or step setting written as a list is a list of candidate values.
 * Normalization lifts each list out of the protocol (the protocol keeps its first value, so every
 * setting stays a scalar), and a candidate is one value per tuned setting, enumerated with the
 * first-written setting varying slowest. Pure.
 */
import type { PreprocessStep, Protocol, TunedSetting } from './types.js';

type Scalar = number | string;

/** Lists among the steps' settings and the model's options, in protocol order; the inputs are left unchanged. */
export function liftGrid(
  steps: readonly PreprocessStep[],
  options: Record<string, unknown>,
): { grid: TunedSetting[]; preprocess: PreprocessStep[]; options: Record<string, unknown> } {
  const grid: TunedSetting[] = [];
  const preprocess = steps.map((s, i) => {
    const out: Record<string, unknown> = { ...s };
    for (const [setting, value] of Object.entries(s)) {
      if (!Array.isArray(value)) continue;
      grid.push({ name: `${s.step}.${setting}`, target: { step: i, setting }, values: value as Scalar[] });
      out[setting] = value[0];
    }
    return out as PreprocessStep;
  });
  const model: Record<string, unknown> = { ...options };
  for (const [option, value] of Object.entries(options)) {
    if (!Array.isArray(value)) continue;
    grid.push({ name: `model.${option}`, target: { option }, values: value as Scalar[] });
    model[option] = value[0];
  }
  return { grid, preprocess, options: model };
}

/** Every candidate as value indices into each setting's list; the last setting varies fastest. */
export function candidates(grid: readonly TunedSetting[]): Int32Array[] {
  let out: Int32Array[] = [new Int32Array(grid.length)];
  grid.forEach((g, at) => {
    out = out.flatMap((c) =>
      g.values.map((_, v) => {
        const next = Int32Array.from(c);
        next[at] = v;
        return next;
      }),
    );
  });
  return out;
}

/** The preprocessing and model of one candidate: the protocol's, with each tuned setting's chosen value. */
export function partsFor(
  p: Pick<Protocol, 'preprocess' | 'model' | 'grid'>,
  pick: ArrayLike<number>,
): Pick<Protocol, 'preprocess' | 'model'> {
  const preprocess = p.preprocess.map((s) => ({ ...s }));
  const options = { ...p.model.options };
  p.grid.forEach((g, i) => {
    const value = g.values[pick[i]];
    if ('step' in g.target) (preprocess[g.target.step] as Record<string, unknown>)[g.target.setting] = value;
    else options[g.target.option] = value;
  });
  return { preprocess, model: { kind: p.model.kind, options } };
}

/** A candidate as `{name: value}`, in grid order (what results and models.json show). */
export function valuesOf(grid: readonly TunedSetting[], pick: ArrayLike<number>): Record<string, Scalar> {
  return Object.fromEntries(grid.map((g, i) => [g.name, g.values[pick[i]]]));
}

/** The preprocessing and model options as the protocol wrote them: each tuned setting's list in place of its first value. */
export function asWritten(p: Pick<Protocol, 'preprocess' | 'model' | 'grid'>): {
  preprocess: PreprocessStep[];
  options: Record<string, unknown>;
} {
  const preprocess = p.preprocess.map((s) => ({ ...s }));
  const options: Record<string, unknown> = { ...p.model.options };
  for (const g of p.grid) {
    if ('step' in g.target) (preprocess[g.target.step] as Record<string, unknown>)[g.target.setting] = g.values;
    else options[g.target.option] = g.values;
  }
  return { preprocess, options };
}
