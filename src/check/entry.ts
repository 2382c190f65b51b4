/** The lock entry of a protocol as it is now. Pure. */
import { canonicalSha256 } from '../manifest/canonical.js';
import { isPinned, type Protocol } from '../protocol/types.js';
import type { Assignment } from '../split/assignment.js';
import { assignmentSha256 } from '../split/csv.js';
import type { LockEntry } from './lock.js';

export function lockEntry(p: Protocol, raw: unknown, dataSha256: string, a: Assignment): LockEntry {
  const n = a.ids.length;
  const assignment: Record<string, string> = {};
  a.ids.forEach((id, row) => {
    const folds: number[] = [];
    for (let r = 0; r < a.repeats; r++) folds.push(a.fold[r * n + row]);
    assignment[id] = folds.join(' ');
  });
  const s = p.split;
  return {
    name: p.name,
    'protocol-sha256': canonicalSha256(raw),
    'data-sha256': dataSha256,
    'assignment-sha256': assignmentSha256(a),
    split: isPinned(s)
      ? { rule: null, seed: null, folds: a.folds, repeats: a.repeats, assign: null, pinned: s.pinned.file }
      : { rule: s.rule, seed: s.seed ?? null, folds: a.folds, repeats: a.repeats, assign: s.assign, pinned: null },
    assignment,
  };
}
