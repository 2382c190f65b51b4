/**
 * models.json: every fold model with its fitted preprocessing, as plain versioned JSON — enough
 * to predict new rows without the training data.
 */
import type { PreprocessStep, ModelKind, ReconcileRule, TieRule } from '../protocol/types.js';
import type { FittedPipeline } from '../preprocess/pipeline.js';

export const MODELS_VERSION = 1;

export interface SavedModel {
  repeat: number;
  fold: number;
  pipeline: FittedPipeline;
  model: unknown;
}

export interface ModelsFile {
  'foldseal-models': typeof MODELS_VERSION;
  'protocol-sha256': string;
  kind: ModelKind;
  preprocess: PreprocessStep[];
  classes: string[];
  /** Input feature names, in the order the pipeline expects them. */
  features: string[];
  missing: string[];
  /** Columns the protocol accounts for without using them (label, group, exclusions): ignored quietly in new rows. */
  'known-columns': string[];
  /** Id column of new-row tables (the protocol's new-rows id, else its data id). */
  id: string | null;
  reconcile: { rule: ReconcileRule; tie: TieRule | null };
  folds: SavedModel[];
  /** A model fitted on every labeled row (rule refit, or run --refit); null otherwise. */
  refit: SavedModel | null;
  /**
   * id → feature digest (see table/row-digest.ts) of every row of the cross-validation: a new
   * row under one of these ids must be that row.
   */
  'known-rows': Record<string, string>;
}

export function modelsJson(m: ModelsFile): string {
  return JSON.stringify(m) + '\n';
}
