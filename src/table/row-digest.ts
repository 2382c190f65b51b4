/**
 * Content digests of rows, so a row is recognized by what it holds, not only by its id. Pure.
 * - sealed rows (`rowDigests`): SHA-256 over the label and the feature values in feature-name
 *   order (UTF-8 byte order), as `label\0name=value\0name=value…`;
 * - known rows of a run (`featureDigests`): the same without the label, first 16 hex digits.
 * Each value is in shortest round-trip form, `NA` when missing. The id is never part of it.
 */
import { createHash } from 'node:crypto';
import { compareUtf8 } from '../util/bytes.js';
import type { Matrix } from './matrix.js';
import type { Table } from './table.js';

function digests(X: Matrix, names: readonly string[], rows: Iterable<number>, prefix: (r: number) => string[], length: number): string[] {
  const order = names.map((_, j) => j).sort((a, b) => compareUtf8(names[a], names[b]));
  const cols = X.cols;
  const out: string[] = [];
  for (const r of rows) {
    const parts = prefix(r);
    for (const j of order) {
      const v = X.data[r * cols + j];
      parts.push(`${names[j]}=${Number.isNaN(v) ? 'NA' : String(v)}`);
    }
    out.push(createHash('sha256').update(parts.join('\0')).digest('hex').slice(0, length));
  }
  return out;
}

function allRows(n: number): number[] {
  return Array.from({ length: n }, (_, i) => i);
}

export function rowDigests(table: Table, rows?: readonly number[]): string[] {
  return digests(table.X, table.featureNames, rows ?? allRows(table.X.rows), (r) => [table.labels[r]], 64);
}

export function featureDigests(X: Matrix, names: readonly string[]): string[] {
  return digests(X, names, allRows(X.rows), () => [], 16);
}
