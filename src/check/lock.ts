/** foldseal.lock.json: what the team accepted for each protocol, plus sealed rows and policy. Pure. */
import { error, type Problem } from '../problems/problem.js';

import { LOCK_FILE } from './lock-name.js';

export { LOCK_FILE };
export const LOCK_VERSION = 1;

export interface LockEntry {
  name: string;
  'protocol-sha256': string;
  'data-sha256': string;
  'assignment-sha256': string;
  split: { rule: string | null; seed: number | null; folds: number; repeats: number; assign: string | null; pinned: string | null };
  /** Fold per id, one number per repeat ("3" or "3 1 5"), so drift can name the ids that moved. */
  assignment: Record<string, string>;
}

export interface Policy {
  /** Every protocol must pin its split or use `assign: stable`. */
  'require-pinned-or-stable'?: boolean;
  /** Manifests under results/ must be signed by one of these key fingerprints. */
  signers?: string[];
  /** No protocol may set verify.tolerance above 0. */
  'forbid-tolerance'?: boolean;
  /** Audit finding kinds (duplicates, split-groups, …) that fail the gate when a protocol's audit warns of them. */
  'forbid-leaks'?: string[];
  /** Folders (relative to the lock) the gate does not look into, besides dot-folders and node_modules. */
  skip?: string[];
  /** Folders the gate looks into although they would be skipped (a dot-folder, say). */
  include?: string[];
}

export interface SealedEntry {
  file: string;
  sha256: string;
  /** Content digests of the sealed rows (see row-digest.ts), recorded by foldseal lock: the same rows under new ids are still sealed. */
  rows?: string[];
}

export interface Lock {
  'foldseal-lock': typeof LOCK_VERSION;
  sealed?: SealedEntry;
  policy?: Policy;
  protocols: Record<string, LockEntry>;
}

export interface ParsedLock {
  lock?: Lock;
  /** The lock's text, for the positions of findings (lockPosition). */
  text?: string;
  problems: Problem[];
}

/** 1-based line and column of byte-free character offset `at` in `text`. */
function lineCol(text: string, at: number): { line: number; col: number } {
  let line = 1;
  let start = 0;
  for (let i = text.indexOf('\n'); i !== -1 && i < at; i = text.indexOf('\n', i + 1)) {
    line++;
    start = i + 1;
  }
  return { line, col: at - start + 1 };
}

/**
 * Where a key path (e.g. ["protocols", "demo.yaml"]) is in the lock's text: each key is looked
 * for after the previous one, as a JSON string followed by a colon. Linear in the text, and only
 * run for the findings that are reported (the lock itself is read with JSON.parse: a 100,000-row
 * lock is 2.5 MB, and a YAML parser with positions took minutes on it).
 */
export function lockPosition(text: string, path: readonly (string | number)[]): { line: number; col: number } | undefined {
  let from = 0;
  let found = -1;
  for (const key of path) {
    const re = new RegExp(`${JSON.stringify(String(key)).replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}\\s*:`, 'g');
    re.lastIndex = from;
    const m = re.exec(text);
    if (!m) return undefined;
    found = m.index;
    from = m.index + m[0].length;
  }
  return found < 0 ? undefined : lineCol(text, found);
}

export function parseLock(text: string, file: string): ParsedLock {
  let v: Lock | undefined;
  try {
    v = JSON.parse(text) as Lock;
  } catch (e) {
    const message = (e as Error).message;
    const at = /position (\d+)/.exec(message);
    return {
      problems: [
        error('lock-corrupt', `the lock is not valid JSON: ${message}`, {
          file,
          position: at ? lineCol(text, Number(at[1])) : { line: 1, col: 1 },
        }),
      ],
    };
  }
  const at = { file, position: { line: 1, col: 1 } };
  if (!v || typeof v !== 'object' || Array.isArray(v)) return { problems: [error('lock-corrupt', 'the lock is not a JSON object', at)] };
  if (v['foldseal-lock'] !== LOCK_VERSION)
    return {
      problems: [
        error(
          'lock-corrupt',
          `lock format ${JSON.stringify(v['foldseal-lock'] ?? null)} is not one this foldseal reads (${LOCK_VERSION})`,
          at,
        ),
      ],
    };
  if (!v.protocols || typeof v.protocols !== 'object')
    return { problems: [error('lock-corrupt', 'the lock has no "protocols" object', at)] };
  return { lock: v, text, problems: [] };
}

export function lockText(lock: Lock): string {
  const sorted: Lock = {
    'foldseal-lock': LOCK_VERSION,
    ...(lock.sealed ? { sealed: lock.sealed } : {}),
    ...(lock.policy ? { policy: lock.policy } : {}),
    protocols: Object.fromEntries(Object.entries(lock.protocols).sort(([a], [b]) => (a < b ? -1 : 1))),
  };
  return JSON.stringify(sorted, null, 2) + '\n';
}

/** Sealed ids: one per line, or a CSV whose first column is headed `id`. */
export function parseSealed(text: string): Set<string> {
  const lines = text
    .split(/\r?\n/)
    .map((l) => l.trim())
    .filter((l) => l !== '');
  const body = lines[0]?.split(',')[0] === 'id' ? lines.slice(1) : lines;
  return new Set(body.map((l) => l.split(',')[0]));
}
