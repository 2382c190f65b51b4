/** foldseal.lock.json: what the team accepted for each protocol, plus sealed rows and policy. Pure. */
import { error, type Problem } from '../problems/problem.js';
import { parseYaml, type SourceDocument } from '../protocol/document.js';

export const LOCK_FILE = 'foldseal.lock.json';
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
  source?: SourceDocument;
  problems: Problem[];
}

export function parseLock(text: string, file: string): ParsedLock {
  // JSON is YAML: the YAML parser keeps positions for located findings.
  const parsed = parseYaml(text, file);
  if (parsed.problems.some((p) => p.severity === 'error'))
    return { problems: parsed.problems.map((p) => ({ ...p, code: 'lock-corrupt', message: `the lock is not valid JSON: ${p.message}` })) };
  const v = parsed.value as Lock | undefined;
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
  return { lock: v, source: parsed.source, problems: [] };
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
