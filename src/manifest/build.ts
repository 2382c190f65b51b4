/** The result manifest: everything a reviewer needs to check a run, as plain JSON. Pure. */
import { SPLIT_VERSION, type Assignment } from '../split/assignment.js';
import { idOrder } from '../split/key.js';
import type { Table } from '../table/table.js';

export const MANIFEST_VERSION = 1;
export const MANIFEST_FILES = ['results.json', 'predictions.csv', 'models.json', 'applied.csv'] as const;

export interface ToolInfo {
  name: 'foldseal';
  version: string;
  node: string;
  platform: string;
}

export interface ManifestInput {
  tool: ToolInfo;
  /** ISO 8601 creation time; recorded, signed, and left out of every comparison. */
  created: string;
  protocol: { document: unknown; sha256: string; location: string };
  dataSha256: string;
  table: Table;
  assignment: Assignment;
  assignmentSha256: string;
  results: Record<string, unknown>;
  files: Record<string, string>;
}

export type Manifest = Record<string, unknown>;

export function buildManifest(m: ManifestInput): Manifest {
  const counts: Record<string, number> = {};
  for (const c of m.table.classes) counts[c] = 0;
  for (const c of m.table.y) counts[m.table.classes[c]]++;
  const order = idOrder(m.assignment.ids);
  const n = m.assignment.ids.length;
  const triples: [string, number, number][] = [];
  for (let r = 1; r <= m.assignment.repeats; r++)
    for (const row of order) triples.push([m.assignment.ids[row], r, m.assignment.fold[(r - 1) * n + row]]);
  return {
    'foldseal-manifest': MANIFEST_VERSION,
    tool: m.tool,
    created: m.created,
    protocol: { sha256: m.protocol.sha256, location: m.protocol.location, document: m.protocol.document },
    data: { sha256: m.dataSha256, rows: n, classes: m.table.classes, 'class-counts': counts },
    split: {
      version: SPLIT_VERSION,
      folds: m.assignment.folds,
      repeats: m.assignment.repeats,
      'assignment-sha256': m.assignmentSha256,
      assignment: triples,
    },
    results: m.results,
    files: m.files,
  };
}
