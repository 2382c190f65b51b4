/** File reading at the edge: every failure becomes a located Problem, never a stack trace. */
import { open, readFile } from 'node:fs/promises';
import { error, type Problem } from '../problems/problem.js';
import { sha256Bytes } from './hash.js';

export interface ReadBytes {
  bytes?: Uint8Array;
  sha256?: string;
  problem?: Problem;
}

/**
 * `shared`: read into a SharedArrayBuffer, so worker threads can read the same bytes without a
 * copy. `hash`: how to hash them (default: here, now); a worker can hash while this thread parses.
 */
export async function readBytes(path: string, shownAs: string, where?: Partial<Problem>, options: { shared?: boolean; hash?: (bytes: Uint8Array) => () => string } = {}): Promise<ReadBytes> {
  try {
    const bytes = options.shared ? await readShared(path) : await readFile(path);
    if (options.hash) {
      const digest = options.hash(bytes);
      return { bytes, get sha256() { return digest(); } };
    }
    return { bytes, sha256: sha256Bytes(bytes) };
  } catch (e) {
    return { problem: fileProblem(e as NodeJS.ErrnoException, shownAs, where) };
  }
}

export function fileProblem(e: NodeJS.ErrnoException, shownAs: string, where: Partial<Problem> = {}): Problem {
  const reason = e.code === 'ENOENT' ? 'does not exist' : e.code === 'EISDIR' ? 'is a folder, not a file' : e.code === 'EACCES' ? 'cannot be read (permission denied)' : `cannot be read (${e.code ?? e.message})`;
  return error(e.code === 'ENOENT' ? 'file-missing' : 'file-unreadable', `file ${shownAs} ${reason}`, where);
}

async function readShared(path: string): Promise<Uint8Array> {
  const file = await open(path, 'r');
  try {
    const size = (await file.stat()).size;
    const bytes = new Uint8Array(new SharedArrayBuffer(size));
    let at = 0;
    while (at < size) {
      const { bytesRead } = await file.read(bytes, at, size - at, at);
      /* c8 ignore next -- the file shrank while being read */
      if (bytesRead === 0) return bytes.subarray(0, at);
      at += bytesRead;
    }
    return bytes;
  } finally {
    await file.close();
  }
}
