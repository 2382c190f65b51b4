/**
 * `run` inside a locked team repository keeps the gate's rules: a protocol in a folder the gate
 * does not search is refused, and so is a non-final protocol that would test on sealed rows
 * (by id or by content), exactly as `foldseal check` would report them.
 */
import { dirname, join, relative } from 'node:path';
import { LOCK_FILE } from '../check/lock-name.js';
import { error, warning, type Problem } from '../problems/problem.js';
import { pathSkipped } from './discover.js';
import { readRegular, readRegularText } from './files.js';
import { folderAbove, isInside, realPath } from './path-policy.js';
import { shown, type ValidationReport } from './validate.js';

/** The nearest folder at or above the protocol's that holds a lock. */
export function findLockFolder(protocolPath: string): string | undefined {
  return folderAbove(dirname(protocolPath), LOCK_FILE);
}

export async function lockedRepoProblems(protocolPath: string, report: ValidationReport): Promise<Problem[]> {
  const root = findLockFolder(protocolPath);
  if (!root) return [];
  // The gate's modules load only in a locked repository.
  const [{ sealedFindings }, { parseLock, parseSealed }] = await Promise.all([import('../check/gate.js'), import('../check/lock.js')]);
  const lockFile = shown(join(root, LOCK_FILE));
  let text: string;
  try {
    text = await readRegularText(join(root, LOCK_FILE));
  } catch {
    return [warning('lock-unreadable', `${lockFile} cannot be read, so the team's rules were not applied to this run`, { file: lockFile })];
  }
  const parsed = parseLock(text, lockFile);
  if (!parsed.lock)
    return [
      warning('lock-corrupt', `${lockFile} is not a lock this foldseal reads, so the team's rules were not applied to this run`, {
        file: lockFile,
      }),
    ];
  const lock = parsed.lock;
  const rel = relative(root, realPath(protocolPath)).split('\\').join('/');
  const rootShown = root === realPath(process.cwd()) ? '.' : shown(root);
  const out: Problem[] = [];
  if (pathSkipped(rel, { skip: lock.policy?.skip, include: lock.policy?.include })) {
    out.push(
      error(
        'protocol-unchecked',
        `${report.file} lies in a folder that the repository gate of ${rootShown} does not search, so its runs would escape the gate`,
        { file: report.file, hint: "move it, or add its folder to the lock's policy.include" },
      ),
    );
  }
  const s = lock.sealed;
  if (s && report.protocol && report.table) {
    const file = join(root, s.file);
    if (!isInside(realPath(file), realPath(root)))
      return [
        ...out,
        error('path-outside', `the sealed-ids file ${s.file} named by the lock lies outside ${rootShown}`, { file: lockFile }),
      ];
    let ids: Set<string>;
    try {
      ids = parseSealed((await readRegular(file)).toString('utf8'));
    } catch {
      return [
        ...out,
        error(
          'sealed-missing',
          `the sealed-ids file ${s.file} named by the lock cannot be read, so this run cannot show it keeps off the sealed rows`,
          { file: lockFile },
        ),
      ];
    }
    out.push(...sealedFindings({ protocols: [{ path: rel, report }], sealed: { ids, file: shown(file), digests: new Set(s.rows ?? []) } }));
  }
  return out;
}
