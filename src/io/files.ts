/** File reading at the edge: every failure becomes a located Problem, never a stack trace. */
import { readFile } from 'node:fs/promises';
import { error, type Problem } from '../problems/problem.js';
import { sha256Bytes } from './hash.js';

export interface ReadBytes {
  bytes?: Uint8Array;
  sha256?: string;
  problem?: Problem;
}

export async function readBytes(path: string, shownAs: string, where?: Partial<Problem>): Promise<ReadBytes> {
  try {
    const bytes = await readFile(path);
    return { bytes, sha256: sha256Bytes(bytes) };
  } catch (e) {
    return { problem: fileProblem(e as NodeJS.ErrnoException, shownAs, where) };
  }
}

export function fileProblem(e: NodeJS.ErrnoException, shownAs: string, where: Partial<Problem> = {}): Problem {
  const reason = e.code === 'ENOENT' ? 'does not exist' : e.code === 'EISDIR' ? 'is a folder, not a file' : e.code === 'EACCES' ? 'cannot be read (permission denied)' : `cannot be read (${e.code ?? e.message})`;
  return error(e.code === 'ENOENT' ? 'file-missing' : 'file-unreadable', `file ${shownAs} ${reason}`, where);
}
