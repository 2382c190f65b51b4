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

/** Worth it when something is learned from moments: a pipeline of moment steps, or a moment model. */
export function canFitByMoments(p: Parts): boolean {
  const steps = p.preprocess.every((s) => momentsOf(transforms[s.step]));
  return steps && (p.preprocess.length > 0 || models[p.model.kind].capabilities?.fromMoments !== undefined);
}

/** The pipelines of every plan, fitted from merged class moments; `modelFromMoments` also fits a moment model from the same moments. */
export function momentPipelines(
  p: Parts,
  d: FoldData & { ids: readonly string[] },
  a: Assignment,
  plans: readonly FoldPlan[],
): { pipeline: FittedPipeline; model?: unknown }[] {
  const impl = models[p.model.kind];
  const k = d.classes.length;
  const options = fitOptions(p.model.kind, p.model.options, d.classes);
  const order = idOrder(d.ids);
  const perRepeat = new Map<number, ClassMoments[]>();
  const n = d.ids.length;
  const blocksOf = (repeat: number) => {
    let blocks = perRepeat.get(repeat);
    if (!blocks) {
      // Fold g's rows in id order, g = 1..K: the same rows and order the plans' test parts use.
      blocks = partMoments(d.X, d.y, k, a.fold.subarray((repeat - 1) * n, repeat * n), a.folds, order);
      perRepeat.set(repeat, blocks);
    }
    return blocks;
  };
  return plans.map((plan) => {
    try {
      return momentPipeline(plan);
    } catch (e) {
      throw atFold(e, plan.repeat, plan.fold);
    }
  });
  function momentPipeline(plan: FoldPlan): { pipeline: FittedPipeline; model?: unknown } {
    let moments: ClassMoments | undefined;
    blocksOf(plan.repeat).forEach((b, g) => {
      if (g + 1 !== plan.fold) moments = moments ? mergeMoments(moments, b) : b;
    });
    let m = moments!;
    let columns = [...d.featureNames];
    const steps: FittedStep[] = [];
    for (const step of p.preprocess) {
      const t = transforms[step.step];
      const moments = momentsOf(t)!;
      const params = moments.fit(m, step);
      m = moments.after(params, m);
      columns = outputColumns(t, params, columns);
      steps.push({ step, params });
    }
    const pipeline = prunePipeline({ steps, columns }, d.X.cols);
    return impl.capabilities?.fromMoments
      ? { pipeline, model: impl.capabilities.fromMoments(m, options, { classCount: k }) }
      : { pipeline };
  }
}

export function fitByMoments(p: Parts, d: FoldData & { ids: readonly string[] }, a: Assignment, plans: readonly FoldPlan[]): FoldFit[] {
  const impl = models[p.model.kind];
  const pipelines = momentPipelines(p, d, a, plans);
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
    const part = proba.slice(at * k, (at + plans[i].test.length) * k);
    at += plans[i].test.length;
    return { ...f, proba: part };
  });
}
