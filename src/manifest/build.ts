/** The result manifest: everything a reviewer needs to check a run, as plain JSON. Pure. */
import { SPLIT_VERSION, type Assignment } from '../split/assignment.js';
import { idOrder } from '../split/key.js';
import { ByteBuilder } from '../util/byte-builder.js';
import { CanonicalText } from './canonical.js';
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

/** Calls f(id, repeat, fold) for the assignment's rows, repeat by repeat, ids in id order, while it returns true. */
function eachTriple(a: Assignment, f: (id: string, repeat: number, fold: number) => boolean): void {
  const order = idOrder(a.ids);
  const n = a.ids.length;
  for (let r = 1; r <= a.repeats; r++) for (let i = 0; i < n; i++) if (!f(a.ids[order[i]], r, a.fold[(r - 1) * n + order[i]])) return;
}

/** The assignment as [id, repeat, fold] triples (the first `limit` only, when given). */
export function assignmentTriples(a: Assignment, limit = Number.POSITIVE_INFINITY): [string, number, number][] {
  const triples: [string, number, number][] = [];
  if (limit > 0) eachTriple(a, (id, r, fold) => triples.push([id, r, fold]) < limit);
  return triples;
}

/** JSON.stringify(assignmentTriples(a)) as UTF-8, written directly: the same text without a small array or a string per row. */
export function assignmentTriplesJson(a: Assignment): Uint8Array {
  const out = new ByteBuilder(triplesSize(a));
  writeAssignmentTriples(a, out);
  return out.result();
}

/** About the length of assignmentTriplesJson(a) (more for long ids). */
function triplesSize(a: Assignment): number {
  return a.ids.length * a.repeats * 20 + 64;
}

/** assignmentTriplesJson(a)'s bytes, written into `out`. */
function writeAssignmentTriples(a: Assignment, out: ByteBuilder): void {
  let first = true;
  out.byte(0x5b); // [
  eachTriple(a, (id, r, fold) => {
    if (!first) out.byte(0x2c);
    first = false;
    out.byte(0x5b);
    out.jsonString(id);
    out.byte(0x2c);
    out.int(r);
    out.byte(0x2c);
    out.int(fold);
    out.byte(0x5d);
    return true;
  });
  out.byte(0x5d);
}

/**
 * `textAssignment`: the assignment as its canonical JSON text (CanonicalText) instead of triples,
 * for a manifest that is only written (run); one that is compared (verify) keeps the triples.
 */
export function buildManifest(m: ManifestInput, textAssignment = false): Manifest {
  const counts: Record<string, number> = {};
  for (const c of m.table.classes) counts[c] = 0;
  for (const c of m.table.y) counts[m.table.classes[c]]++;
  const n = m.assignment.ids.length;
  // Written straight into the manifest's bytes when those are made (signing and verify take the text).
  const triples = textAssignment
    ? new CanonicalText((out) => writeAssignmentTriples(m.assignment, out), triplesSize(m.assignment))
    : assignmentTriples(m.assignment);
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
