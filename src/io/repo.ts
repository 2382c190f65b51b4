/** Reads a team repository for the gate: its protocols, lock, sealed list and signed manifests. */
import { existsSync } from 'node:fs';
import { readdir, stat } from 'node:fs/promises';
import { join, relative } from 'node:path';
import { lockEntry } from '../check/entry.js';
import type { GateInput, ProtocolState } from '../check/gate.js';
import { LOCK_FILE, parseLock, parseSealed, type ParsedLock } from '../check/lock.js';
import { checkManifest } from '../manifest/check.js';
import { error, FoldsealError, type Problem } from '../problems/problem.js';
import { discoverProtocols } from './discover.js';
import { MANIFEST_SCHEMA, schemaValidator } from './schemas.js';
import { readRegular, readRegularText } from './files.js';
import { outsideProblem, trustedFolders } from './path-policy.js';
import { sha256Bytes } from './hash.js';
import { shown, validateProtocol } from './validate.js';
import { auditReport } from './audit-protocol.js';

export interface Repo {
  input: GateInput;
  /** Folders the gate did not look into (relative to the root). */
  skipped: string[];
  /** Problems of the repository files themselves (sealed file unreadable or changed). */
  problems: Problem[];
}

/** `allowOutside`: protocols may name files outside the checked folder (and FOLDSEAL_TRUSTED). */
export async function readRepo(root: string, allowOutside = false): Promise<Repo> {
  const problems: Problem[] = [];
  const st = await stat(root).catch((e: NodeJS.ErrnoException) => e);
  if (st instanceof Error)
    throw new FoldsealError(
      error('folder-missing', `${shown(root) || '.'} ${st.code === 'ENOENT' ? 'does not exist' : `cannot be read (${st.code})`}`, {
        file: shown(root),
      }),
      2,
    );
  if (!st.isDirectory())
    throw new FoldsealError(error('not-a-folder', `${shown(root)} is not a folder; give the repository folder`, { file: shown(root) }), 2);
  const lockPath = join(root, LOCK_FILE);
  const lockFile = shown(lockPath);
  let lock: ParsedLock | undefined;
  if (existsSync(lockPath)) {
    lock = parseLock(await readRegularText(lockPath), lockFile);
    // A corrupt lock is a usage-level failure: the gate cannot judge anything against it.
    if (!lock.lock) throw new FoldsealError(lock.problems, 2);
  }
  const protocols: ProtocolState[] = [];
  const policy = lock?.lock?.policy;
  const discovered = await discoverProtocols(root, { skip: policy?.skip, include: policy?.include });
  const access = { roots: [root, ...trustedFolders()], allowOutside };
  // A policy that forbids leaks needs each protocol's audit (its non-feature columns described).
  const audits = Boolean(policy?.['forbid-leaks']?.length);
  for (const path of discovered.found) {
    const report = await validateProtocol(join(root, path), { access, describe: audits });
    const entry =
      report.protocol && report.assignment && report.dataSha256
        ? lockEntry(report.protocol, report.raw, report.dataSha256, report.assignment)
        : undefined;
    protocols.push({ path, report, entry, audit: audits ? auditReport(report)?.findings : undefined });
  }
  let sealed: GateInput['sealed'];
  const s = lock?.lock?.sealed;
  if (s) {
    const file = join(root, s.file);
    const outside = outsideProblem(file, { roots: [root], allowOutside: false }, s.file, 'sealed-ids file', { file: lockFile });
    try {
      if (outside) throw outside;
      const bytes = await readRegular(file);
      if (sha256Bytes(bytes) !== s.sha256)
        problems.push(
          error(
            'sealed-hash-mismatch',
            `the sealed-ids file ${s.file} has SHA-256 ${sha256Bytes(bytes)}, not the ${s.sha256} the lock records`,
            { file: lockFile },
          ),
        );
      sealed = { ids: parseSealed(bytes.toString('utf8')), file: shown(file), digests: new Set(s.rows ?? []) };
    } catch (e) {
      if (e === outside) problems.push(outside!);
      problems.push(error('sealed-missing', `the sealed-ids file ${s.file} named by the lock cannot be read`, { file: lockFile }));
    }
  }
  const manifests: GateInput['manifests'] = [];
  if (lock?.lock?.policy?.signers) {
    for (const file of await findManifests(join(root, 'results'))) {
      const text = await readRegularText(file);
      const detached = await readRegularText(`${file}.sig`).catch(() => undefined);
      manifests.push({
        file: shown(file),
        check: checkManifest(text, { file: shown(file), allowUnpinned: true, detached, validate: schemaValidator(MANIFEST_SCHEMA) }),
      });
    }
  }
  return { input: { protocols, lock, lockFile, sealed, manifests }, problems, skipped: discovered.skipped };
}

async function findManifests(dir: string): Promise<string[]> {
  if (!existsSync(dir)) return [];
  const out: string[] = [];
  for (const e of await readdir(dir, { withFileTypes: true, recursive: true })) {
    if (e.isFile() && e.name === 'manifest.json')
      out.push(join((e as unknown as { parentPath?: string; path: string }).parentPath ?? (e as unknown as { path: string }).path, e.name));
  }
  return out.sort();
}

export function relativePosix(root: string, path: string): string {
  return relative(root, path).split('\\').join('/');
}
