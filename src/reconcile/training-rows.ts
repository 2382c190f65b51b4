/**
 * Fold models that keep their training rows (k nearest neighbours) are saved in models.json
 * with a reference to those rows instead of a copy: which rows of the run's table they were,
 * and a SHA-256 of the rows as the model read them. The data file's hash already seals the
 * table, so `apply` rebuilds the rows from it (through the fold's saved pipeline) and checks
 * them against that SHA-256 before it predicts anything. Pure.
 *
 * The reference, `training-rows` beside the model:
 * - `rows`: how many training rows; `table-rows`: how many rows the run's table has;
 * - `bits`: base64 of ⌈table-rows / 8⌉ bytes, bit (i mod 8) of byte ⌊i / 8⌋ (least significant
 *   first) set when table row i (0-based, file order after the protocol's filters) trained the
 *   model; the rows are taken in the split spec's id order;
 * - `sha256`: of the training matrix after the fold's pipeline (row-major float64, little-endian)
 *   followed by the rows' class codes (int32, little-endian).
 */
import { models } from '../model/registry.js';
import { applyPipeline, type FittedPipeline } from '../preprocess/pipeline.js';
import type { ModelKind } from '../protocol/types.js';
import { idOrder } from '../util/id-order.js';
import { sha256Bytes } from '../util/sha256.js';
import { takeInt, type Matrix } from '../table/matrix.js';

export interface TrainingRows {
  rows: number;
  'table-rows': number;
  bits: string;
  sha256: string;
}

/** Does this model kind keep its training rows (so models.json references them)? */
export function keepsRows(kind: ModelKind): boolean {
  return models[kind].capabilities?.keepsRows !== undefined;
}

/** A fitted model as models.json saves it: the parameters without the rows, and the reference to them. */
export function referenced(
  kind: ModelKind,
  model: unknown,
  train: Int32Array,
  tableRows: number,
): { model: Record<string, unknown>; 'training-rows': TrainingRows } {
  const keeps = models[kind].capabilities!.keepsRows!;
  const bits = new Uint8Array(Math.ceil(tableRows / 8));
  for (let i = 0; i < train.length; i++) bits[train[i] >> 3] |= 1 << (train[i] & 7);
  return {
    model: keeps.without(model as never),
    'training-rows': {
      rows: train.length,
      'table-rows': tableRows,
      bits: Buffer.from(bits.buffer, bits.byteOffset, bits.length).toString('base64'),
      sha256: rowsDigest(keeps.rows(model as never)),
    },
  };
}

/** Why a saved reference cannot be followed on this table, in words; undefined when it can. */
export type Restored = { model: unknown; problem?: undefined } | { problem: 'table-rows' | 'bits' | 'changed'; detail: string };

/**
 * The whole model back from its saved parameters, the reference and the run's table (its X with
 * every feature, its class codes and ids): the training rows are taken from the table in id
 * order, passed through the fold's pipeline, and must hash to the recorded SHA-256.
 */
export function restored(
  kind: ModelKind,
  saved: { model: unknown; pipeline: FittedPipeline; 'training-rows': TrainingRows },
  table: { X: Matrix; y: Int32Array; ids: readonly string[] },
): Restored {
  const ref = saved['training-rows'];
  const n = table.ids.length;
  if (ref['table-rows'] !== n) return { problem: 'table-rows', detail: `the run's table had ${ref['table-rows']} rows, this one has ${n}` };
  const bits = Buffer.from(ref.bits, 'base64');
  if (bits.length !== Math.ceil(n / 8) || (n % 8 !== 0 && bits[bits.length - 1] >> (n % 8) !== 0))
    return { problem: 'bits', detail: `its row list is not ${Math.ceil(n / 8)} bytes of base64 for ${n} rows` };
  const rows = idOrder(table.ids).filter((r) => (bits[r >> 3] & (1 << (r & 7))) !== 0);
  if (rows.length !== ref.rows)
    return { problem: 'bits', detail: `its row list names ${rows.length} rows, not the ${ref.rows} it records` };
  const keeps = models[kind].capabilities!.keepsRows!;
  const model = keeps.with(saved.model as Record<string, unknown>, applyPipeline(saved.pipeline, table.X, rows), takeInt(table.y, rows));
  const digest = rowsDigest(keeps.rows(model));
  if (digest !== ref.sha256)
    return { problem: 'changed', detail: `the rebuilt training rows have SHA-256 ${digest}, not the ${ref.sha256} recorded` };
  return { model };
}

function rowsDigest({ X, y }: { X: Float64Array; y: Int32Array }): string {
  const bytes = new Uint8Array(X.byteLength + y.byteLength);
  const view = new DataView(bytes.buffer);
  for (let i = 0; i < X.length; i++) view.setFloat64(i * 8, X[i], true);
  for (let i = 0; i < y.length; i++) view.setInt32(X.byteLength + i * 4, y[i], true);
  return sha256Bytes(bytes);
}
