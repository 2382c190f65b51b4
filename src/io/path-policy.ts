/**
 * Where a file named by a document may be read from. A protocol, a manifest or a lock is text
 * someone else may have written; the paths inside it must stay inside folders the user chose
 * (see "Security model" in the README). Symbolic links are resolved before the comparison, so a
 * link inside the folder that points out of it is outside too.
 */
import { existsSync, realpathSync } from 'node:fs';
import { basename, dirname, isAbsolute, join, relative, resolve } from 'node:path';
import { error, type Problem } from '../problems/problem.js';

export interface PathPolicy {
  /** Folders (absolute) that named files may lie in. */
  roots: string[];
  /** The user lifted the rule for this invocation (--allow-outside). */
  allowOutside: boolean;
}

/** Folders listed in FOLDSEAL_TRUSTED (separated by the platform's path-list separator, ':' on POSIX). */
export function trustedFolders(env: NodeJS.ProcessEnv = process.env): string[] {
  return (env.FOLDSEAL_TRUSTED ?? '')
    .split(process.platform === 'win32' ? ';' : ':')
    .filter(Boolean)
    .map((d) => resolve(d));
}

/** The path with symbolic links resolved as far as it exists (a missing tail is kept as written). */
export function realPath(path: string): string {
  const abs = resolve(path);
  try {
    return realpathSync(abs);
  } catch {
    const up = dirname(abs);
    return up === abs ? abs : resolve(realPath(up), basename(abs));
  }
}

/** The nearest folder at or above `dir` (symbolic links resolved) that holds an entry `name`. */
export function folderAbove(dir: string, name: string): string | undefined {
  let at = realPath(dir);
  for (;;) {
    if (existsSync(join(at, name))) return at;
    const up = dirname(at);
    if (up === at) return undefined;
    at = up;
  }
}

export function isInside(path: string, folder: string): boolean {
  const rel = relative(folder, path);
  return rel === '' || (!rel.startsWith('..') && !isAbsolute(rel));
}

/**
 * The policy for the paths inside a protocol the user named on the command line: its own folder,
 * the working folder when the protocol lies inside it, and the trusted folders.
 */
export function protocolPolicy(protocolPath: string, allowOutside = false, cwd = process.cwd()): PathPolicy {
  const folder = dirname(resolve(protocolPath));
  const roots = [folder];
  if (isInside(realPath(folder), realPath(cwd))) roots.push(resolve(cwd));
  return { roots: [...new Set([...roots, ...trustedFolders()])], allowOutside };
}

/** A problem when `path` (named at `where`) lies outside every root of the policy. */
export function outsideProblem(
  path: string,
  policy: PathPolicy,
  shownAs: string,
  what: string,
  where: Partial<Problem>,
): Problem | undefined {
  if (policy.allowOutside) return undefined;
  const real = realPath(path);
  if (policy.roots.some((root) => isInside(real, realPath(root)))) return undefined;
  return error(
    'path-outside',
    `the ${what} ${shownAs} lies outside ${policy.roots.length === 1 ? 'the folder' : 'the folders'} foldseal may read for this ` +
      `file (${policy.roots.map((r) => r).join(', ')})`,
    {
      ...where,
      hint:
        'keep data next to the protocol, run from the project folder, list the folder in FOLDSEAL_TRUSTED, or pass ' +
        '--allow-outside if you trust the file that names this path',
    },
  );
}
