/** model.kind → implementation. Adding a model: one file here and one line below (plus its options in the schema). */
import type { ModelKind } from '../protocol/types.js';
import { bernoulliNb } from './bernoulli-nb.js';
import { gaussianNb } from './gaussian-nb.js';
import { knn } from './knn.js';
import { logistic } from './logistic.js';
import { multinomialNb } from './multinomial-nb.js';
import { shrunkenCentroid } from './shrunken-centroid.js';
import type { ModelImpl } from './types.js';

export const models: Record<ModelKind, ModelImpl<any>> = {
  'gaussian-nb': gaussianNb,
  'multinomial-nb': multinomialNb,
  'bernoulli-nb': bernoulliNb,
  logistic,
  knn,
  'shrunken-centroid': shrunkenCentroid,
};

/** Protocol options → the options a fit sees (class-keyed maps become arrays in class order). */
export function fitOptions(kind: ModelKind, options: Record<string, unknown>, classes: readonly string[]): Record<string, unknown> {
  if (kind === 'gaussian-nb' && options.priors) {
    const priors = options.priors as Record<string, number>;
    return { ...options, priors: classes.map((c) => priors[c]) };
  }
  return options;
}
