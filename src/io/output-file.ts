/** Writing one output file (folds, apply, init): every failure a clear problem naming the path, never a stack trace; never half-written. */
import { access, constants, lstat, open, rename, unlink } from 'node:fs/promises';
import { existsSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { randomBytes } from 'node:crypto';
import { error, FoldsealError, type Problem } from '../problems/problem.js';

export function writeProblem(e: NodeJS.ErrnoException, shownAs: string, path?: string): Problem {
  const code = e.code;
  const reason =
    code === 'ENOENT' && path !== undefined && existsSync(dirname(path))
      ? 'cannot be written: the folder exists but refuses new files'
      : code === 'ENOENT'
        ? `cannot be written: the folder ${dirname(shownAs)} does not exist`
        : code === 'EISDIR'
          ? 'is a folder; give a file name'
          : code === 'ENOTDIR'
            ? `cannot be written: a part of the path ${shownAs} is a file, not a folder`
            : code === 'EACCES' || code === 'EPERM'
              ? 'cannot be written (permission denied)'
              : code === 'EROFS'
                ? 'cannot be written (the file system is read-only)'
                : code === 'ENOSPC'
                  ? 'cannot be written: the disk is full'
                  : code === 'EDQUOT'
                    ? 'cannot be written: the disk quota is used up'
                    : code === 'EEXIST'
                      ? 'already exists'
                      : `cannot be written (${code ?? e.message})`;
  return error(code === 'EEXIST' ? 'refuse-overwrite' : 'write-failed', `${shownAs} ${reason}`, { file: shownAs });
}

/**
 * Writes `content` to `path` through a temporary sibling renamed into place, so the file is either
 * the old one or the complete new one. `replace`: an existing regular file may be replaced (a
 * folder, a device or a link never is).
 */
export async function writeOutputFile(path: string, content: string | Uint8Array, shownAs: string, replace: boolean): Promise<void> {
  const existing = await lstat(path).catch(() => undefined);
  if (existing) {
    if (existing.isDirectory()) throw new FoldsealError(writeProblem(Object.assign(new Error(), { code: 'EISDIR' }), shownAs), 2);
    if (!existing.isFile())
      throw new FoldsealError(
        error('write-failed', `${shownAs} exists and is not a regular file, so foldseal will not write over it`, { file: shownAs }),
        2,
      );
    if (
      await access(path, constants.W_OK).then(
        () => false,
        () => true,
      )
    )
      throw new FoldsealError(error('write-failed', `${shownAs} is read-only, so foldseal will not replace it`, { file: shownAs }), 2);
    if (!replace)
      throw new FoldsealError(
        {
          ...writeProblem(Object.assign(new Error(), { code: 'EEXIST' }), shownAs),
          hint: 'pass --force to replace it, or --out to choose another name',
        },
        2,
      );
  }
  const temp = join(dirname(path), `.${basename(path)}.foldseal-${randomBytes(6).toString('hex')}`);
  try {
    const file = await open(temp, 'wx');
    try {
      await file.writeFile(content);
      await file.sync();
    } finally {
      await file.close();
    }
    await rename(temp, path);
  } catch (e) {
    await unlink(temp).catch(() => undefined);
    throw new FoldsealError(writeProblem(e as NodeJS.ErrnoException, shownAs, path), 2);
  }
}
