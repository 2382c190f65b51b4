/** A validated protocol and its data → every output file of a run, as text. Pure. */
import { canonicalSha256 } from '../manifest/canonical.js';
import { FitError } from '../model/types.js';
import { TransformError } from '../preprocess/types.js';
import { error, FoldsealError, type Problem } from '../problems/problem.js';
import type { Protocol } from '../protocol/types.js';
import type { Assignment } from '../split/assignment.js';
import { assignmentCsv } from '../split/csv.js';
import type { Table } from '../table/table.js';
import { sha256Bytes } from '../io/hash.js';
import { crossValidate, type CvHooks, type CvResult } from './cross-validate.js';
import { predictionsCsv } from './predictions.js';
import { buildResults } from './results.js';

export interface RunInput {
  protocol: Protocol;
  /** The protocol document as plain data (hashed in canonical form). */
  raw: unknown;
  protocolFile: string;
  table: Table;
  dataSha256: string;
  assignment: Assignment;
  warnings: Problem[];
}

export interface RunOutput {
  cv: CvResult;
  results: Record<string, unknown>;
  assignmentCsv: string;
  files: Record<string, string>;
}

export function runProtocol(input: RunInput, hooks: CvHooks = {}): RunOutput {
  let cv: CvResult;
  try {
    cv = crossValidate(input.protocol, input.table, input.assignment, hooks);
  } catch (e) {
    if (e instanceof FitError || e instanceof TransformError) {
      throw new FoldsealError(error(e.code, e.message, { file: input.protocolFile, hint: e.hint }), 1);
    }
    throw e;
  }
  const folds = assignmentCsv(input.assignment);
  const predictions = predictionsCsv(cv, input.table);
  const files: Record<string, string> = { 'predictions.csv': predictions };
  const results = buildResults({
    protocol: input.protocol,
    protocolSha256: canonicalSha256(input.raw),
    dataSha256: input.dataSha256,
    table: input.table,
    assignment: input.assignment,
    assignmentSha256: sha256Bytes(folds),
    cv,
    files: { 'predictions.csv': sha256Bytes(predictions) },
    warnings: [...input.warnings, ...cv.warnings],
  });
  files['results.json'] = JSON.stringify(results, null, 2) + '\n';
  return { cv, results, assignmentCsv: folds, files };
}
