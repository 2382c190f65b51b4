/** How often each feature reached the model across the fold models (after in-fold selection). Pure. */
export interface FeatureCount {
  feature: string;
  /** Fold models whose model read the feature. */
  folds: number;
  share: number;
}

/** From models.json: features by how many fold models read them, most first, then by name. */
export function featureStability(models: { folds: { pipeline: { columns: string[] } }[] }): { total: number; features: FeatureCount[] } {
  const total = models.folds.length;
  const count = new Map<string, number>();
  for (const f of models.folds) for (const c of f.pipeline.columns) count.set(c, (count.get(c) ?? 0) + 1);
  const features = [...count]
    .map(([feature, folds]) => ({ feature, folds, share: folds / total }))
    .sort((a, b) => b.folds - a.folds || (a.feature < b.feature ? -1 : a.feature > b.feature ? 1 : 0));
  return { total, features };
}
