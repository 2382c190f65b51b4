/** What the audit reads: the validated protocol, its table and folds, the non-feature columns, and where things are. */
import type { Problem } from '../problems/problem.js';
import type { Protocol } from '../protocol/types.js';
import type { Assignment } from '../split/assignment.js';
import type { Described } from '../table/covariates.js';
import type { Table } from '../table/table.js';

export interface AuditInput {
  protocol: Protocol;
  table: Table;
  assignment: Assignment;
  described: Described;
  /** The location of a protocol field (file, line, col), for findings about the design. */
  protocolAt(path: (string | number)[]): Partial<Problem>;
}

/** Where a row is: the file, line and column of its first feature cell. */
export function rowAt(input: AuditInput, row: number): Partial<Problem> {
  const { file, line, col } = input.described.featureCell(row, 0);
  return { file, position: { line, col } };
}

/** Repeats (1-based) in which the rows do not all share one fold; empty when they always do. */
export function repeatsSpanned(a: Assignment, rows: ArrayLike<number>): number[] {
  const n = a.ids.length;
  const out: number[] = [];
  for (let r = 0; r < a.repeats; r++) {
    const first = a.fold[r * n + rows[0]];
    for (let i = 1; i < rows.length; i++) {
      if (a.fold[r * n + rows[i]] !== first) {
        out.push(r + 1);
        break;
      }
    }
  }
  return out;
}

/** "a, b, c and 4 more" */
export function listed(items: readonly string[], max = 5): string {
  const shownItems = items.slice(0, max).join(', ');
  return items.length > max ? `${shownItems} and ${items.length - max} more` : shownItems;
}

export function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}
