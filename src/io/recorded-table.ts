/**
 * `apply` puts back the training rows of fold models that reference them (k nearest neighbours):
 * it reads the run's table again through the protocol the manifest records, from the data file
 * that protocol names (or a copy given with --data), whose hash must be the one recorded.
 */
import { dirname, join, resolve } from 'node:path';
import { canonicalSha256 } from '../manifest/canonical.js';
import { error, FoldsealError, hasErrors, type Problem } from '../problems/problem.js';
import { restored } from '../reconcile/training-rows.js';
import type { ModelsFile, SavedModel } from '../reconcile/models-file.js';
import type { Table } from '../table/table.js';
import { localizeProtocol, reviewPolicy, withProtocolCopy } from './recorded-protocol.js';
import { parseJson, readInput } from './results-dir.js';
import { shown, validateProtocol } from './validate.js';

export interface TableSource {
  /** A copy of the run's data file (its hash must be the recorded one). */
  data?: string;
  /** Let the read go outside the review folders. */
  allowOutside?: boolean;
}

const HINT = 'pass --data FILE with a copy of the data the run read (its SHA-256 must be the one recorded)';

/**
 * The saved fold and refit models with their training rows put back from the run's table;
 * models without a reference stay as they are. Every rebuilt model's rows must hash to what
 * was recorded.
 */
export async function withTrainingRows(
  resultsDir: string,
  saved: ModelsFile,
  source: TableSource,
): Promise<{ folds: SavedModel[]; refit: SavedModel | null }> {
  const all = saved.refit ? [...saved.folds, saved.refit] : saved.folds;
  if (!all.some((m) => m['training-rows'] !== undefined)) return { folds: saved.folds, refit: saved.refit };
  const table = await recordedTable(resultsDir, saved['protocol-sha256'], source);
  const modelsFile = shown(join(resultsDir, 'models.json'));
  const back = (m: SavedModel): SavedModel => {
    if (m['training-rows'] === undefined) return m;
    const rebuilt = restored(saved.kind, m as Parameters<typeof restored>[1], table);
    if (rebuilt.problem !== undefined)
      throw new FoldsealError(
        error(
          'training-rows-changed',
          `the ${saved.kind} model of ${m.repeat === 0 ? 'the refit' : `repeat ${m.repeat}, fold ${m.fold}`} cannot be rebuilt from the ` +
            `run's table: ${rebuilt.detail}`,
          {
            file: modelsFile,
            hint: 'this foldseal rebuilds the rows differently from the one that ran: apply with that version, or run the protocol again',
          },
        ),
        1,
      );
    return { ...m, model: rebuilt.model };
  };
  return { folds: saved.folds.map(back), refit: saved.refit && back(saved.refit) };
}

async function recordedTable(resultsDir: string, protocolSha256: string, source: TableSource): Promise<Table> {
  const manifestPath = join(resultsDir, 'manifest.json');
  const manifestShown = shown(manifestPath);
  const m = parseJson(await readInput(manifestPath), manifestPath);
  const doc = m?.protocol?.document;
  const unavailable = (message: string, extra: Problem[] = [], hint = HINT) =>
    new FoldsealError([...extra, error('training-rows-unavailable', message, { file: manifestShown, hint })], 1);
  if (!doc || typeof doc !== 'object' || canonicalSha256(doc) !== protocolSha256)
    throw unavailable(
      `${manifestShown} does not record the protocol models.json was made by`,
      [],
      'give apply the results folder as run wrote it',
    );
  // The new rows the run predicted are not part of its table.
  if (doc.reconcile?.['new-rows']) delete doc.reconcile['new-rows'];
  const manifestDir = dirname(resolve(manifestPath));
  const base = resolve(manifestDir, m.protocol.location ?? '.');
  const access = reviewPolicy(manifestDir, source);
  const outside = localizeProtocol(doc, base, access, source.data, manifestShown);
  if (outside.length)
    throw unavailable(
      `the ${doc.model?.kind} fold models reference their training rows, and the run's files lie outside the review folders`,
      outside,
      `${HINT}, or --allow-outside if you trust this results folder`,
    );
  const report = await withProtocolCopy(doc, (path) => validateProtocol(path, { access }));
  // The protocol is a temporary copy: its problems name the manifest, and a changed data file is not the run's.
  const errors = report.problems
    .filter((q) => q.severity === 'error')
    .map((q) => ({
      ...q,
      ...(q.file === report.file ? { file: manifestShown, position: undefined } : {}),
      ...(q.code === 'data-hash-mismatch' ? { hint: 'this is not the data the run read' } : {}),
    }));
  if (report.unreadable || hasErrors(report.problems) || !report.table)
    throw unavailable(`the ${doc.model?.kind} fold models reference their training rows, and the run's table cannot be read again`, errors);
  return report.table;
}
