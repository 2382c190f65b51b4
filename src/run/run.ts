/** A validated protocol and its data → every output file of a run, as text. Pure. */
import { canonicalSha256 } from '../manifest/canonical.js';
import { FitError } from '../model/types.js';
import { error, FoldsealError, hasErrors, type Problem } from '../problems/problem.js';
import { scoreNewRows, type NewRowScores } from '../reconcile/new-row-scores.js';
import { positiveClass, testsFoldOneOnly, type Protocol } from '../protocol/types.js';
import { asWritten, candidates, partsFor, valuesOf } from '../protocol/grid.js';
import { searchGrid, type FoldSearch } from './nested.js';
import { runInner, wantsColumns } from './executor.js';
import type { Assignment } from '../split/assignment.js';
import { assignmentSha256 as assignmentHash } from '../split/csv.js';
import type { Table } from '../table/table.js';
import { sha256Bytes } from '../util/sha256.js';
import { fitOptions, models } from '../model/registry.js';
import { columnMajor, fitPipelineOnRows } from '../preprocess/by-columns.js';
import { prunePipeline } from '../preprocess/pipeline.js';
import { appliedCsv, applyRows, type AppliedRow } from '../reconcile/applied.js';
import type { GivenProbabilities } from '../reconcile/reconcile.js';
import { heldOutFromOof } from '../reconcile/held-out.js';
import { KnownRowList } from '../reconcile/known-ids.js';
import { keepsRows, referenced } from '../reconcile/training-rows.js';
import { MODELS_VERSION, modelsJsonBytes, modelsJsonPieces, type ModelsFile, type SavedModel } from '../reconcile/models-file.js';
import { idOrder } from '../split/key.js';
import { takeInt } from '../table/matrix.js';
import type { NewRows } from '../table/new-rows.js';
import { knownColumns } from '../protocol/known-columns.js';
import { crossValidate, type CvHooks, type CvResult } from './cross-validate.js';
import { predictionsCsv, predictionsPieces } from './predictions.js';
import { buildResults } from './results.js';
import { runStatistics, type RunStatistics } from './statistics.js';

export interface RunInput {
  /** Rows to predict after the cross-validation (the protocol's reconcile.new-rows). */
  newRows?: NewRows;
  /** Also fit one model on every labeled row (always done for rule refit). */
  refit?: boolean;
  protocol: Protocol;
  /** The protocol document as plain data (hashed in canonical form). */
  raw: unknown;
  protocolFile: string;
  table: Table;
  dataSha256: string;
  /** Samples a sample-sheet join left out (data.samples.unmatched: drop). */
  joined?: { 'data-only': number; 'sheet-only': number };
  filtered?: { before: number; after: number };
  assignment: Assignment;
  warnings: Problem[];
  /** What the shell computed for a command model: its refit model and the models' probabilities of the new rows. */
  external?: { refit?: SavedModel; newRows?: GivenProbabilities };
}

export interface RunOutput {
  cv: CvResult;
  statistics?: RunStatistics;
  applied?: AppliedRow[];
  /** Scores of the new rows on their own labels, when the new-rows file has the label column. */
  newRowScores?: NewRowScores;
  results: Record<string, unknown>;
  assignmentSha256: string;
  /**
   * The other files by name: models.json as bytes (a million known rows go straight into them;
   * absent when a sink took it), the rest as text.
   */
  files: { 'models.json'?: Uint8Array; 'results.json': string; 'applied.csv'?: string };
  /** predictions.csv, as bytes: the largest file, hashed and written without a text copy (absent when a sink took it). */
  predictions?: Uint8Array;
  /** SHA-256 of predictions.csv and of every file in `files`. */
  digests: Record<string, string>;
}

/**
 * Takes a results file (predictions.csv, models.json) piece by piece as it is made (each piece
 * valid only until the next) and returns its SHA-256.
 */
export type OutputSink = (name: 'predictions.csv' | 'models.json', pieces: Iterable<Uint8Array>) => string;

/**
 * `fitted` is a cross-validation already done elsewhere (on worker threads), `permuted` the
 * permutation test's permuted scores likewise; without them they are computed here.
 */
export function runProtocol(
  input: RunInput,
  hooks: CvHooks = {},
  fitted?: CvResult,
  permuted?: Float64Array,
  sink?: OutputSink,
): RunOutput {
  const cv: CvResult = fitted ?? guardFit(input.protocolFile, () => crossValidate(input.protocol, input.table, input.assignment, hooks));
  // Written as it is made when the shell takes it (a million lines never held whole), else kept.
  const predictions = sink ? undefined : predictionsCsv(cv, input.table);
  const predictionsSha256 = sink ? sink('predictions.csv', predictionsPieces(cv, input.table)) : sha256Bytes(predictions!);
  const p = input.protocol;
  const protocolSha256 = canonicalSha256(input.raw);
  const refitted =
    input.refit || p.reconcile.rule === 'refit'
      ? input.external?.refit
        ? { model: input.external.refit, search: undefined }
        : fitOnAll(input)
      : null;
  const refit = refitted?.model ?? null;
  const saved: ModelsFile = {
    'foldseal-models': MODELS_VERSION,
    'protocol-sha256': protocolSha256,
    kind: p.model.kind,
    // A tuned setting shows its candidate list here; each fold's pipeline and `chosen` hold what it used.
    preprocess: asWritten(p).preprocess,
    classes: cv.classes,
    features: input.table.featureNames,
    missing: p.data.missing,
    'known-columns': knownColumns(p),
    ...(p.data.classes ? { 'class-map': p.data.classes } : {}),
    id: p.reconcile.newRows?.id ?? p.data.id ?? null,
    reconcile: { rule: p.reconcile.rule, tie: p.reconcile.tie ?? null },
    ...(p.model.command
      ? {
          command: {
            run: p.model.command.run,
            files: p.model.command.files,
            'time-limit': p.model.command.timeLimit,
            options: p.model.options,
          },
        }
      : {}),
    folds: cv.models.map((m) => savedModel(p.model.kind, m, input.table.ids.length)),
    refit: refit && savedModel(p.model.kind, refit, input.table.ids.length),
    'known-rows': KnownRowList.of(input.table.ids, input.table.X, input.table.featureNames),
  };
  // Streamed like predictions.csv when the shell takes it: a million known rows are some 30 MB.
  const models = sink ? undefined : modelsJsonBytes(saved);
  const modelsSha256 = sink ? sink('models.json', modelsJsonPieces(saved)) : sha256Bytes(models!);
  let appliedText: string | undefined;
  let applied: AppliedRow[] | undefined;
  let newRowScores: NewRowScores | undefined;
  if (input.newRows) {
    applied = guardFit(input.protocolFile, () =>
      applyRows({
        kind: p.model.kind,
        folds: cv.models,
        refit,
        classes: cv.classes,
        rule: p.reconcile.rule,
        tie: p.reconcile.tie ?? null,
        rows: input.newRows!,
        heldOut: heldOutFromOof(input.table.ids, cv.oof, cv.testedIn, cv.classes.length),
        given: input.external?.newRows,
      }),
    );
    const labels = input.newRows.labels && new Map(input.newRows.ids.map((id, i) => [id, input.newRows!.labels![i]]));
    if (labels) {
      const s = scoreNewRows(
        applied,
        { byId: labels, classMap: p.data.classes, missing: p.data.missing },
        cv.classes,
        cv.positive,
        p.metrics,
        input.protocolFile,
      );
      if (hasErrors(s.problems)) throw new FoldsealError(s.problems, 1);
      newRowScores = s.scores;
    }
    appliedText = appliedCsv(applied, cv.classes, undefined, labels);
  }
  const digests: Record<string, string> = {
    'predictions.csv': predictionsSha256,
    'models.json': modelsSha256,
    ...(appliedText === undefined ? {} : { 'applied.csv': sha256Bytes(appliedText) }),
  };
  const assignmentSha256 = assignmentHash(input.assignment);
  const statistics = guardFit(input.protocolFile, () => runStatistics(p, input.table, input.assignment, cv, permuted));
  const results = buildResults({
    statistics,
    newRowScores,
    protocol: input.protocol,
    protocolSha256,
    dataSha256: input.dataSha256,
    joined: input.joined,
    filtered: input.filtered,
    table: input.table,
    assignment: input.assignment,
    assignmentSha256,
    cv,
    files: { ...digests },
    refitSearch: refitted?.search,
    warnings: [...input.warnings, ...cv.warnings],
  });
  const files: RunOutput['files'] = {
    ...(models ? { 'models.json': models } : {}),
    ...(appliedText === undefined ? {} : { 'applied.csv': appliedText }),
    'results.json': JSON.stringify(results, null, 2) + '\n',
  };
  digests['results.json'] = sha256Bytes(files['results.json']);
  return { cv, results, assignmentSha256, files, predictions, digests, applied, statistics, newRowScores };
}

/** A fold model as models.json saves it: a model that keeps its training rows references them (training-rows.ts). */
function savedModel(kind: Protocol['model']['kind'], m: SavedModel & { train?: Int32Array }, tableRows: number): SavedModel {
  const { train, ...rest } = m;
  return train && keepsRows(kind) ? { ...rest, ...referenced(kind, m.model, train, tableRows) } : rest;
}

export function guardFit<T>(protocolFile: string, f: () => T): T {
  try {
    return f();
  } catch (e) {
    throw asUserError(e, protocolFile);
  }
}

/** A fit or transform failure is the user's to fix: it becomes a located FoldsealError; anything else stays a bug. */
export function asUserError(e: unknown, protocolFile: string): unknown {
  return e instanceof FitError ? new FoldsealError(error(e.code, e.message, { file: protocolFile, hint: e.hint }), 1) : e;
}

/** The rows a refit model is fitted on, in id order: every labeled row, but a final protocol's sealed rows (fold 1). */
export function refitRows(p: Pick<Protocol, 'split' | 'final'>, ids: readonly string[], a: Assignment): Int32Array {
  const all = idOrder(ids);
  return testsFoldOneOnly(p) ? all.filter((row) => a.fold[row] !== 1) : all;
}

/**
 * One pipeline and model fitted on every labeled row, visited in id order. A tuned protocol
 * first searches its grid on those rows (as outer repeat 0, fold 0) and fits the winner.
 */
function fitOnAll(input: RunInput): { model: SavedModel & { train: Int32Array }; search?: FoldSearch } {
  const { table } = input;
  const order = refitRows(input.protocol, table.ids, input.assignment);
  return guardFit(input.protocolFile, () => {
    const tune = input.protocol.tune;
    let p: Pick<Protocol, 'preprocess' | 'model'> = input.protocol;
    let search: FoldSearch | undefined;
    let chosen: Record<string, number | string> | undefined;
    if (tune) {
      const tuned = { ...input.protocol, tune };
      search = searchGrid(tuned, { ...table, positive: positiveClass(tuned, table.classes) }, order, { repeat: 0, fold: 0 }, runInner);
      const pick = candidates(tuned.grid)[search.chosen];
      p = partsFor(tuned, pick);
      chosen = valuesOf(tuned.grid, pick);
    }
    const y = takeInt(table.y, order);
    const { pipeline, X } = fitPipelineOnRows(
      p.preprocess,
      table.X,
      order,
      y,
      table.classes.length,
      table.featureNames,
      wantsColumns(p) ? columnMajor(table.X) : undefined,
    );
    const model = models[p.model.kind].fit(X, y, fitOptions(p.model.kind, p.model.options, table.classes), {
      classCount: table.classes.length,
    });
    return {
      model: { repeat: 0, fold: 0, pipeline: prunePipeline(pipeline, table.X.cols), model, ...(chosen ? { chosen } : {}), train: order },
      search,
    };
  });
}
