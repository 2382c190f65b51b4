/**
 * models.json: every fold model with its fitted preprocessing, as plain versioned JSON — enough
 * to predict new rows without the training data.
 */
import type { PreprocessStep, ModelKind, ReconcileRule, TieRule } from '../protocol/types.js';
import type { FittedPipeline } from '../preprocess/pipeline.js';
import { KnownRowList } from './known-ids.js';
import type { TrainingRows } from './training-rows.js';

/** 2: a model that keeps its training rows references them (`training-rows`) instead of copying them. */
export const MODELS_VERSION = 2;

export interface SavedModel {
  repeat: number;
  fold: number;
  pipeline: FittedPipeline;
  model: unknown;
  /** A tuned protocol's chosen value of each tuned setting (the fitted pipeline and model already carry them). */
  chosen?: Record<string, number | string>;
  /** Which rows of the run's table trained a model that keeps its rows (`model` then lacks them): training-rows.ts. */
  'training-rows'?: TrainingRows;
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
  /** Columns the protocol accounts for without using them (the label first, then group, exclusions): ignored quietly in new rows. */
  'known-columns': string[];
  /** data.classes: label values per class, when the protocol maps them (labels of new rows are read through it). */
  'class-map'?: Record<string, string[]>;
  /** Id column of new-row tables (the protocol's new-rows id, else its data id). */
  id: string | null;
  reconcile: { rule: ReconcileRule; tie: TieRule | null };
  folds: SavedModel[];
  /** A command model's program (docs/command-models.md): `apply` runs it on the saved model folders, with consent. */
  command?: { run: string[]; files: { file: string; sha256: string }[]; 'time-limit': number; options: Record<string, unknown> };
  /** A model fitted on every labeled row (rule refit, or run --refit); null otherwise. */
  refit: SavedModel | null;
  /**
   * id → feature digest (see table/row-digest.ts) of every row of the cross-validation: a new
   * row under one of these ids must be that row.
   */
  'known-rows': Record<string, string> | KnownRowList;
}

export function modelsJson(m: ModelsFile): string {
  const bytes = modelsJsonBytes(m);
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.length).toString('utf8');
}

/** models.json as UTF-8: a run's million known rows go straight into the bytes (no text in between). */
export function modelsJsonBytes(m: ModelsFile): Uint8Array {
  // Without a piece size, the one piece is the whole file.
  const [whole] = modelsJsonPieces(m, Number.POSITIVE_INFINITY);
  return whole;
}

/**
 * models.json as UTF-8 in pieces of about `piece` bytes, each valid until the next is asked for:
 * a run's million known rows are written to the file without the file being held whole.
 */
export function* modelsJsonPieces(m: ModelsFile, piece = 1 << 20): Generator<Uint8Array> {
  const known = m['known-rows'];
  const keys = Object.keys(m);
  if (!(known instanceof KnownRowList)) return yield Buffer.from(JSON.stringify(m) + '\n');
  // The list's text is spliced in where JSON.stringify would have put the object: last.
  if (keys[keys.length - 1] !== 'known-rows')
    return yield Buffer.from(JSON.stringify({ ...m, 'known-rows': JSON.parse(known.json()) }) + '\n');
  const { 'known-rows': _, ...rest } = m;
  yield* known.pieces(`${JSON.stringify(rest).slice(0, -1)},"known-rows":`, '}\n', piece);
}

/** 1 for each input feature that some model the rule uses reads (all of them for a model whose pipeline is not pruned). */
export function neededFeatures(m: Pick<ModelsFile, 'features' | 'folds' | 'refit'>, rule: ReconcileRule): Uint8Array {
  const needed = new Uint8Array(m.features.length);
  const used = rule === 'refit' ? (m.refit ? [m.refit] : []) : m.folds;
  for (const s of used) {
    if (s.pipeline.input) for (const j of s.pipeline.input) needed[j] = 1;
    else needed.fill(1);
  }
  return needed;
}
