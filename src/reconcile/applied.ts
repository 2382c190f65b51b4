/** applied.csv and the disagreement report: new rows through the declared rule, known rows held out. Pure. */
import { predictedClasses } from '../metric/types.js';
import type { ModelKind, ReconcileRule, TieRule } from '../protocol/types.js';
import { compareUtf8 } from '../util/bytes.js';
import { csvCell, csvLine, numberText } from '../table/csv-write.js';
import type { NewRows } from '../table/new-rows.js';
import type { HeldOut } from './held-out.js';
import type { SavedModel } from './models-file.js';
import { reconcile, type GivenProbabilities } from './reconcile.js';

export type Source = 'held-out' | 'folds' | 'refit';

export interface AppliedRow {
  id: string;
  source: Source;
  /** Class code, or −1 when a tied vote abstains. */
  predicted: number;
  agreement: number;
  values: Float64Array;
  /** Top class per fold model (or per repeat for held-out rows). */
  tops: number[];
  tied: boolean;
}

export interface ApplyInput {
  kind: ModelKind;
  folds: readonly SavedModel[];
  refit: SavedModel | null;
  classes: readonly string[];
  rule: ReconcileRule;
  tie: TieRule | null;
  rows: NewRows;
  heldOut: Map<string, HeldOut>;
  /** The models' probabilities of the rows when they were computed outside (a command model). */
  given?: GivenProbabilities;
}

export function applyRows(a: ApplyInput): AppliedRow[] {
  const k = a.classes.length;
  const r = reconcile(a.kind, a.folds, a.refit, a.rows.X, k, a.rule, a.tie, a.given);
  const out: AppliedRow[] = a.rows.ids.map((id, i) => {
    const known = a.heldOut.get(id);
    if (known) {
      const predicted = predictedClasses(known.mean, k)[0];
      return {
        id,
        source: 'held-out',
        predicted,
        agreement: known.tops.filter((t) => t === predicted).length / known.tops.length,
        values: known.mean,
        tops: known.tops,
        tied: false,
      };
    }
    return {
      id,
      source: a.rule === 'refit' ? 'refit' : 'folds',
      predicted: r.predicted[i],
      agreement: r.agreement[i],
      values: r.values.slice(i * k, (i + 1) * k),
      tops: r.top.map((t) => t[i]),
      tied: r.tied[i] === 1,
    };
  });
  return out.sort((x, y) => compareUtf8(x.id, y.id));
}

/** `labels`: the new rows' own labels by id (a held-back test set), kept in a `label` column after the id. */
export function appliedCsv(
  rows: readonly AppliedRow[],
  classes: readonly string[],
  comment?: string,
  labels?: ReadonlyMap<string, string>,
): string {
  const parts: string[] = [];
  if (comment) parts.push(`# ${comment}\n`);
  parts.push(csvLine(['id', ...(labels ? ['label'] : []), 'source', 'predicted', 'agreement', ...classes.map((c) => `p_${c}`)]));
  for (const r of rows) {
    parts.push(
      `${csvCell(r.id)},${labels ? `${csvCell(labels.get(r.id) ?? '')},` : ''}${r.source},${r.predicted === -1 ? '' : csvCell(classes[r.predicted])},${r.agreement},` +
        `${Array.from(r.values, numberText).join(',')}\n`,
    );
  }
  return parts.join('');
}

/** Text for the terminal: how many rows the fold models disagree on, and the lowest-agreement ones. */
export function disagreementReport(rows: readonly AppliedRow[], classes: readonly string[], limit = 10): string {
  const split = rows.filter((r) => r.agreement < 1 || r.tied);
  const lines = [
    `${split.length} of ${rows.length} rows have fold models that disagree (agreement < ` +
      `1)${rows.some((r) => r.tied) ? `; ${rows.filter((r) => r.tied).length} tied votes` : ''}`,
  ];
  const worst = [...split].sort((a, b) => a.agreement - b.agreement || compareUtf8(a.id, b.id)).slice(0, limit);
  for (const r of worst) {
    lines.push(
      `  ${r.id}  ${r.source}  agreement ${r.agreement.toFixed(2)}  predicted ` +
        `${r.predicted === -1 ? '(abstained)' : classes[r.predicted]}  models: ${r.tops.map((t) => classes[t]).join(' ')}`,
    );
  }
  return lines.join('\n') + '\n';
}
