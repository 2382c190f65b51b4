/** File reading at the edge: every failure becomes a located Problem, never a stack trace. */
import { constants } from 'node:fs';
import { open } from 'node:fs/promises';
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
export async function readBytes(
  path: string,
  shownAs: string,
  where?: Partial<Problem>,
  options: { shared?: boolean; hash?: (bytes: Uint8Array) => () => string } = {},
): Promise<ReadBytes> {
  try {
    const bytes = options.shared ? await readShared(path) : await readRegular(path);
    if (options.hash) {
      const digest = options.hash(bytes);
      return {
        bytes,
        get sha256() {
          return digest();
        },
      };
    }
    return { bytes, sha256: sha256Bytes(bytes) };
  } catch (e) {
    return { problem: fileProblem(e as NodeJS.ErrnoException, shownAs, where) };
  }
}

export function fileProblem(e: NodeJS.ErrnoException, shownAs: string, where: Partial<Problem> = {}): Problem {
  const reason =
    e.code === 'ENOENT'
      ? 'does not exist'
      : e.code === 'EISDIR'
        ? 'is a folder, not a file'
        : e.code === 'EACCES'
          ? 'cannot be read (permission denied)'
          : e.code === NOT_REGULAR
            ? `is not a regular file (${e.message}); foldseal reads only plain files`
            : e.code === TOO_LARGE
              ? `is larger than ${e.message}`
              : `cannot be read (${e.code ?? e.message})`;
  return error(
    e.code === 'ENOENT'
      ? 'file-missing'
      : e.code === NOT_REGULAR
        ? 'file-not-regular'
        : e.code === TOO_LARGE
          ? 'file-too-large'
          : 'file-unreadable',
    `file ${shownAs} ${reason}`,
    where,
  );
}

const NOT_REGULAR = 'FOLDSEAL_NOT_REGULAR';
const TOO_LARGE = 'FOLDSEAL_TOO_LARGE';

function failure(code: string, message: string): NodeJS.ErrnoException {
  return Object.assign(new Error(message), { code });
}

/**
 * Opens a file for reading and refuses anything but a regular file: a device (/dev/zero), a FIFO
 * or a socket would hang or never end. O_NONBLOCK keeps the open itself from waiting on a FIFO
 * with no writer; the type is checked on the open descriptor, so a swap after a check cannot
 * slip a device in.
 */
async function openRegular(path: string) {
  const file = await open(path, constants.O_RDONLY | constants.O_NONBLOCK);
  const st = await file.stat();
  if (!st.isFile()) {
    await file.close();
    if (st.isDirectory()) throw failure('EISDIR', 'is a folder');
    throw failure(
      NOT_REGULAR,
      st.isFIFO() ? 'a FIFO' : st.isSocket() ? 'a socket' : st.isCharacterDevice() || st.isBlockDevice() ? 'a device' : 'not a plain file',
    );
  }
  return { file, size: st.size };
}

/** The whole of a regular file; `limit` bytes at most (larger files fail with a clear reason). */
export async function readRegular(path: string, limit = Infinity): Promise<Buffer> {
  const { file, size } = await openRegular(path);
  try {
    if (size > limit) throw failure(TOO_LARGE, `${limitText(limit)}, the most foldseal reads for this kind of file`);
    return await file.readFile();
  } finally {
    await file.close();
  }
}

/** The file as text (UTF-8), thrown errors mapped by `fileProblem`. */
export async function readRegularText(path: string, limit = Infinity): Promise<string> {
  return (await readRegular(path, limit)).toString('utf8');
}

function limitText(bytes: number): string {
  return bytes >= 1 << 20 ? `${bytes / (1 << 20)} MiB` : `${bytes} bytes`;
}

async function readShared(path: string): Promise<Uint8Array> {
  const { file, size } = await openRegular(path);
  try {
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
