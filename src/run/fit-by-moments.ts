/**
 * Fold fits from class moments. When every preprocessing step learns only class moments of its
 * input (standardize, select) and so does the model (gaussian-nb, shrunken-centroid), each fold's
 * rows are summarized once per repeat, and a fold's pipeline and model are fitted from the
 * merged moments of every other fold — exactly its training rows (Chan, Golub & LeVeque 1979
 * for the merge). Each step also carries the moments through to its output, so nothing passes
 * over the training rows per fold; a model that needs rows gets the training rows through the
 * fitted pipeline instead. The values equal the row-by-row fit up to rounding (tests bound the
 * difference). Pure.
 */
import { mergeMoments, partMoments, type ClassMoments } from '../model/class-moments.js';
import { fitOptions, models } from '../model/registry.js';
import type { ModelCapabilities } from '../model/types.js';
import { applyPipeline, prunePipeline, type FittedPipeline, type FittedStep } from '../preprocess/pipeline.js';
import { transforms } from '../preprocess/registry.js';
import { momentsOf, outputColumns } from '../preprocess/capability.js';
import type { Protocol } from '../protocol/types.js';
import type { Assignment } from '../split/assignment.js';
import { idOrder } from '../split/key.js';
import { atFold, fitModelAfterPipeline, type FoldData, type FoldFit } from './fit-fold.js';
import type { FoldPlan } from './cross-validate.js';

type Parts = Pick<Protocol, 'preprocess' | 'model'>;

/** The table as moment fits read it: `order`, the rows in id order, when the ids themselves are not at hand (another thread). */
export type MomentData = FoldData & { ids: readonly string[]; order?: Int32Array };

/** Worth it when something is learned from moments: a pipeline of moment steps, or a moment model. */
export function canFitByMoments(p: Parts): boolean {
  const steps = p.preprocess.every((s) => momentsOf(transforms[s.step]));
  return steps && (p.preprocess.length > 0 || models[p.model.kind].capabilities?.fromMoments !== undefined);
}

/**
 * Work a grid search shares between candidates fitted on the same table, assignment and plans:
 * each repeat's part moments, and each plan's pipeline up to a step (keyed by the steps' settings).
 * Only the caller that made it may pass it back, for the same data; the results are the same bits.
 */
export interface MomentMemo {
  blocks: Map<number, ClassMoments[]>;
  prefix: Map<string, { m: ClassMoments; columns: string[]; steps: FittedStep[] }>;
}

export function newMomentMemo(): MomentMemo {
  return { blocks: new Map(), prefix: new Map() };
}

/** The pipelines of every plan, fitted from merged class moments; `modelFromMoments` also fits a moment model from the same moments. */
export function momentPipelines(
  p: Parts,
  d: MomentData,
  a: Pick<Assignment, 'fold' | 'folds'>,
  plans: readonly FoldPlan[],
  memo: MomentMemo = newMomentMemo(),
): { pipeline: FittedPipeline; model?: unknown }[] {
  const impl = models[p.model.kind];
  const k = d.classes.length;
  const options = fitOptions(p.model.kind, p.model.options, d.classes);
  const order = d.order ?? idOrder(d.ids);
  const perRepeat = memo.blocks;
  const n = d.X.rows;
  const blocksOf = (repeat: number) => {
    let blocks = perRepeat.get(repeat);
    if (!blocks) {
      // Fold g's rows in id order, g = 1..K: the same rows and order the plans' test parts use.
      blocks = partMoments(d.X, d.y, k, a.fold.subarray((repeat - 1) * n, repeat * n), a.folds, order);
      perRepeat.set(repeat, blocks);
    }
    return blocks;
  };
  return plans.map((plan, index) => {
    try {
      return momentPipeline(plan, index);
    } catch (e) {
      throw atFold(e, plan.repeat, plan.fold);
    }
  });
  function momentPipeline(plan: FoldPlan, index: number): { pipeline: FittedPipeline; model?: unknown } {
    const keys = p.preprocess.map((_, i) => `${index}|${JSON.stringify(p.preprocess.slice(0, i + 1))}`);
    let done = keys.length;
    while (done > 0 && !memo.prefix.has(keys[done - 1])) done--;
    let m: ClassMoments;
    let columns: string[];
    let steps: FittedStep[];
    if (done > 0) {
      ({ m, columns, steps } = memo.prefix.get(keys[done - 1])!);
      steps = [...steps];
    } else {
      let moments: ClassMoments | undefined;
      blocksOf(plan.repeat).forEach((b, g) => {
        if (g + 1 !== plan.fold) moments = moments ? mergeMoments(moments, b) : b;
      });
      m = moments!;
      columns = [...d.featureNames];
      steps = [];
    }
    for (let i = done; i < p.preprocess.length; i++) {
      const step = p.preprocess[i];
      const t = transforms[step.step];
      const moments = momentsOf(t)!;
      const params = moments.fit(m, step);
      m = moments.after(params, m);
      columns = outputColumns(t, params, columns);
      steps.push({ step, params });
      memo.prefix.set(keys[i], { m, columns, steps: [...steps] });
    }
    const pipeline = prunePipeline({ steps, columns }, d.X.cols);
    return impl.capabilities?.fromMoments
      ? { pipeline, model: impl.capabilities.fromMoments(m, options, { classCount: k }) }
      : { pipeline };
  }
}

export function fitByMoments(
  p: Parts,
  d: MomentData,
  a: Pick<Assignment, 'fold' | 'folds'>,
  plans: readonly FoldPlan[],
  memo?: MomentMemo,
): FoldFit[] {
  const impl = models[p.model.kind];
  const pipelines = momentPipelines(p, d, a, plans, memo);
  // A model that needs rows gets the training rows through the fitted pipeline.
  if (!impl.capabilities?.fromMoments) {
    return pipelines.map((f, i) => {
      try {
        return fitModelAfterPipeline(p, d, f.pipeline, plans[i].train, plans[i].test);
      } catch (e) {
        throw atFold(e, plans[i].repeat, plans[i].fold);
      }
    });
  }
  const fitted = pipelines.map((f) => ({ pipeline: f.pipeline, model: f.model }));
  if (p.preprocess.length === 0 && impl.capabilities?.predictRows) return predictTogether(impl.capabilities.predictRows, fitted, d, plans);
  return fitted.map((f, i) => ({ ...f, proba: impl.predict(f.model, applyPipeline(f.pipeline, d.X, plans[i].test)) }));
}

/** Whether the whole fold fit comes from moments (cheap per fold), or a model still fits on rows after moment pipelines. */
export function modelFromMoments(p: Parts): boolean {
  return models[p.model.kind].capabilities?.fromMoments !== undefined;
}

/** Every plan's test rows in one call (rows straight from X, no pipeline), split back by plan. */
function predictTogether(
  predictRows: NonNullable<ModelCapabilities<unknown>['predictRows']>,
  fitted: Omit<FoldFit, 'proba'>[],
  d: FoldData,
  plans: readonly FoldPlan[],
): FoldFit[] {
  const k = d.classes.length;
  let total = 0;
  for (const plan of plans) total += plan.test.length;
  const which = new Int32Array(total);
  const modelOf = new Int32Array(total);
  let at = 0;
  plans.forEach((plan, i) => {
    which.set(plan.test, at);
    modelOf.fill(i, at, at + plan.test.length);
    at += plan.test.length;
  });
  const proba = predictRows(
    fitted.map((f) => f.model),
    d.X,
    which,
    modelOf,
  );
  at = 0;
  return fitted.map((f, i) => {
    // Views of the one array (fold fits made here are never posted to another thread).
    const part = proba.subarray(at * k, (at + plans[i].test.length) * k);
    at += plans[i].test.length;
    return { ...f, proba: part };
  });
}
