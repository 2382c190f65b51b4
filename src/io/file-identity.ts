/**
 * A file opened by several threads and at several times must be one file: its device, inode,
 * size and modification time at the first opening are its identity, and every later opening is
 * checked against them (see streamed-read.ts).
 */
import { closeSync, constants, fstatSync, openSync, readSync } from 'node:fs';
import { error, FoldsealError } from '../problems/problem.js';
import type { ReadInto } from '../table/streamed-grid.js';

export interface FileIdentity {
  dev: number;
  ino: number;
  size: number;
  mtimeMs: number;
}

/** Opens the file for reading; undefined for anything but a regular file (the whole-file reader reports it). */
export function openIdentified(path: string): { fd: number; identity: FileIdentity } | undefined {
  let fd: number;
  try {
    fd = openSync(path, constants.O_RDONLY | constants.O_NONBLOCK);
  } catch {
    return undefined;
  }
  if (!fstatSync(fd).isFile()) {
    closeSync(fd);
    return undefined;
  }
  return { fd, identity: identityOf(fd) };
}

/** The identity of an open file now. */
export function identityOf(fd: number): FileIdentity {
  const st = fstatSync(fd);
  return { dev: st.dev, ino: st.ino, size: st.size, mtimeMs: st.mtimeMs };
}

/** The file at `path` opened again; undefined unless it is the same file, unchanged. */
export function openedAgain(path: string, identity: FileIdentity): number | undefined {
  const opened = openIdentified(path);
  if (opened && sameFile(opened.identity, identity)) return opened.fd;
  if (opened) closeSync(opened.fd);
  return undefined;
}

/** openedAgain, refused with data-changed-while-read when it is not the same file. */
export function reopen(path: string, identity: FileIdentity, shownAs: string): number {
  const fd = openedAgain(path, identity);
  if (fd === undefined) throw changedWhileRead(shownAs);
  return fd;
}

export function sameFile(a: FileIdentity, b: FileIdentity): boolean {
  return a.dev === b.dev && a.ino === b.ino && a.size === b.size && a.mtimeMs === b.mtimeMs;
}

export function changedWhileRead(shownAs: string): FoldsealError {
  return new FoldsealError(
    error('data-changed-while-read', `${shownAs} changed while foldseal read it`, {
      file: shownAs,
      hint: 'run again once nothing writes to the file',
    }),
    1,
  );
}

/** Reads from an open file at explicit offsets (several threads may read one file at once). */
export function fdReader(fd: number, shownAs: string): ReadInto {
  return (offset, into, length) => {
    for (let done = 0; done < length; ) {
      const n = readSync(fd, into, done, length - done, offset + done);
      if (n === 0) throw changedWhileRead(shownAs); // the file shrank
      done += n;
    }
  };
}
