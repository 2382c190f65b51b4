/**
 * Fold fits from class moments, for models that learn only moments (fromMoments) and protocols
 * with no preprocessing: each fold's rows are summarized once per repeat, and a fold's model is
 * fitted from the merged moments of every other fold, which are exactly its training rows. The
 * per-fold work is then independent of the training part's size. Pure.
 */
import { mergeMoments, classMoments, type ClassMoments } from '../model/class-moments.js';
import { fitOptions, models } from '../model/registry.js';
import type { Protocol } from '../protocol/types.js';
import { foldRows, type Assignment } from '../split/assignment.js';
import { idOrder } from '../split/key.js';
import { takeRows } from '../table/matrix.js';
import type { FoldData, FoldFit } from './fit-fold.js';
import type { FoldPlan } from './cross-validate.js';

export function canFitByMoments(p: Pick<Protocol, 'preprocess' | 'model'>): boolean {
  return p.preprocess.length === 0 && models[p.model.kind].fromMoments !== undefined;
}

export function fitByMoments(p: Pick<Protocol, 'preprocess' | 'model'>, d: FoldData & { ids: readonly string[] }, a: Assignment, plans: readonly FoldPlan[]): FoldFit[] {
  const impl = models[p.model.kind];
  const k = d.classes.length;
  const options = fitOptions(p.model.kind, p.model.options, d.classes);
  const order = idOrder(d.ids);
  const perRepeat = new Map<number, ClassMoments[]>();
  const blocksOf = (repeat: number) => {
    let blocks = perRepeat.get(repeat);
    if (!blocks) {
      // Fold g's rows in id order, g = 1..K: the same rows and order the plans' test parts use.
      blocks = Array.from({ length: a.folds }, (_, g) => classMoments(d.X, d.y, k, foldRows(a, repeat, g + 1, order).test));
      perRepeat.set(repeat, blocks);
    }
    return blocks;
  };
  return plans.map((plan) => {
    const blocks = blocksOf(plan.repeat);
    let training: ClassMoments | undefined;
    blocks.forEach((b, g) => { if (g + 1 !== plan.fold) training = training ? mergeMoments(training, b) : b; });
    const model = impl.fromMoments!(training!, options, { classCount: k });
    return { pipeline: { steps: [], columns: [...d.featureNames] }, model, proba: impl.predict(model, takeRows(d.X, plan.test)) };
  });
}
