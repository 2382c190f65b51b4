import { execFileSync } from 'node:child_process';
import { resolve } from 'node:path';
import { gate, type GateInput, type ProtocolState } from '../../check/gate.js';
import { error, FoldsealError, hasErrors } from '../../problems/problem.js';
import { countSummary } from '../../problems/format.js';
import { readRepo, relativePosix } from '../../io/repo.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems, type OutputFormat } from '../report-problems.js';

export interface CheckArgs {
  dir: string;
  format: OutputFormat;
  staged?: boolean;
  allowOutside?: boolean;
}

export async function checkCommand(args: CheckArgs, io: CommandIo): Promise<ExitCode> {
  const root = resolve(args.dir);
  const repo = await readRepo(root, Boolean(args.allowOutside));
  const input = repo.input;
  if (args.staged) input.only = stagedScope(root, input);
  const findings = [...repo.problems, ...gate(input)];
  const checked = input.only ? input.only.size : input.protocols.length;
  if (args.format === 'json') {
    reportProblems(io, findings, 'json');
  } else {
    reportProblems(io, findings, 'text');
    io.err(`${checked} protocol${checked === 1 ? '' : 's'} checked: ${countSummary(findings)}${skippedNote(repo.skipped)}\n`);
  }
  return hasErrors(findings) ? 1 : 0;
}

/** Protocols touched by the staged change, plus every protocol that shares data with them. */
function stagedScope(root: string, input: GateInput): Set<string> {
  let staged: string[];
  // A repository's own config can name programs git runs (core.fsmonitor on every index read, an
  // external diff): the user asked for git's staged list, not for those, so they are switched off.
  const safe = ['-c', 'core.fsmonitor=false'];
  const git = (args: string[]) =>
    execFileSync('git', [...safe, ...args], { cwd: root, encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
  try {
    git(['rev-parse', '--is-inside-work-tree']);
  } catch {
    throw new FoldsealError(
      error('not-a-git-repo', `${root} is not a git repository (nor inside one), so --staged has no staged change to read`, {
        hint: 'run foldseal check without --staged, or inside a git work tree',
      }),
      2,
    );
  }
  try {
    staged = git(['diff', '--cached', '--name-only', '--relative', '--no-ext-diff', '--no-textconv']).split('\n').filter(Boolean);
  } catch (e) {
    throw new FoldsealError(
      error(
        'git-failed',
        `git could not list the staged files: ${
          String((e as { stderr?: string }).stderr ?? '')
            .trim()
            .split('\n')[0]
        }`,
      ),
      2,
    );
  }
  const protocols = input.protocols;
  const dataOf = (p: ProtocolState) => p.report.paths?.data;
  const touched = new Set(staged);
  const scope = new Set<string>();
  const touchedData = new Set<string>();
  for (const p of protocols) {
    const data = dataOf(p);
    if (touched.has(p.path) || (data && touched.has(relativePosix(root, data)))) {
      scope.add(p.path);
      if (data) touchedData.add(resolve(data));
    }
  }
  for (const p of protocols) {
    const data = dataOf(p);
    if (data && touchedData.has(resolve(data))) scope.add(p.path);
  }
  return scope;
}

/** The folders the gate did not look into, so nothing hides there unnoticed. */
export function skippedNote(skipped: readonly string[]): string {
  if (!skipped.length) return '';
  const shownList = skipped.slice(0, 8).join(', ') + (skipped.length > 8 ? `, and ${skipped.length - 8} more` : '');
  return `; not searched: ${shownList} (add folders to the lock's policy.include to search them)`;
}
