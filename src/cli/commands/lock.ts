import { existsSync } from 'node:fs';
import { writeOutputFile } from '../../io/output-file.js';
import { readRegularText } from '../../io/files.js';
import { sealedDigests } from '../../check/gate.js';
import { join, resolve } from 'node:path';
import { LOCK_FILE, LOCK_VERSION, lockText, parseLock, type Lock } from '../../check/lock.js';
import { FoldsealError, hasErrors } from '../../problems/problem.js';
import { readRepo } from '../../io/repo.js';
import { shown } from '../../io/validate.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems } from '../report-problems.js';

/** Records every protocol's current state; the printed changes are what a reviewer approves. */
export async function lockCommand(args: { dir: string; allowOutside?: boolean }, io: CommandIo): Promise<ExitCode> {
  const root = resolve(args.dir);
  const repo = await readRepo(root, Boolean(args.allowOutside));
  const invalid = repo.input.protocols.flatMap((p) => p.report.problems.filter((q) => q.severity === 'error'));
  if (invalid.length) {
    reportProblems(io, invalid, 'text');
    io.err('nothing written: every protocol must validate before it can be locked\n');
    return 1;
  }
  const lockPath = join(root, LOCK_FILE);
  const changes: string[] = [];
  let old: Lock | undefined;
  if (existsSync(lockPath)) {
    const parsed = parseLock(await readRegularText(lockPath), LOCK_FILE);
    if (!parsed.lock) throw new FoldsealError(parsed.problems, 2);
    old = parsed.lock;
  }
  // Sealed rows are recorded by content too, so a copy under new ids is caught even after the final data moves.
  const sealedIds = repo.input.sealed?.ids;
  const sealed =
    old?.sealed && sealedIds
      ? {
          file: old.sealed.file,
          sha256: old.sealed.sha256,
          rows: [...new Set([...(old.sealed.rows ?? []), ...sealedDigests(repo.input.protocols, sealedIds)])].sort(),
        }
      : old?.sealed;
  if (sealed?.rows?.length && (old?.sealed?.rows?.length ?? 0) !== sealed.rows.length)
    changes.push(`sealed rows: ${sealed.rows.length} content digest${sealed.rows.length === 1 ? '' : 's'} recorded`);
  const next: Lock = { 'foldseal-lock': LOCK_VERSION, sealed, policy: old?.policy, protocols: {} };
  for (const p of repo.input.protocols) {
    const entry = p.entry!;
    next.protocols[p.path] = entry;
    const before = old?.protocols[p.path];
    if (!before) {
      changes.push(`+ ${p.path} (${entry.name}): added`);
      continue;
    }
    const what: string[] = [];
    if (before.split.seed !== entry.split.seed) what.push(`seed ${before.split.seed} → ${entry.split.seed}`);
    if (before.split.rule !== entry.split.rule || before.split.pinned !== entry.split.pinned)
      what.push(`split ${before.split.rule ?? before.split.pinned} → ${entry.split.rule ?? entry.split.pinned}`);
    if (before['data-sha256'] !== entry['data-sha256']) what.push('data changed');
    if (before['assignment-sha256'] !== entry['assignment-sha256']) {
      const moved = Object.entries(before.assignment).filter(
        ([id, f]) => entry.assignment[id] !== undefined && entry.assignment[id] !== f,
      ).length;
      what.push(`${moved} ids moved`);
    }
    if (!what.length && before['protocol-sha256'] !== entry['protocol-sha256']) what.push('protocol text changed');
    if (what.length) changes.push(`~ ${p.path}: ${what.join(', ')}`);
  }
  for (const path of Object.keys(old?.protocols ?? {})) if (!next.protocols[path]) changes.push(`- ${path}: removed`);
  await writeOutputFile(lockPath, lockText(next), shown(lockPath), true);
  io.out(changes.length ? changes.join('\n') + '\n' : 'no changes\n');
  io.err(`wrote ${LOCK_FILE} (${Object.keys(next.protocols).length} protocols)\n`);
  return hasErrors(repo.problems) ? 1 : 0;
}
