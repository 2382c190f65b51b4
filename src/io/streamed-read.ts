/**
 * A large plain table read in stretches instead of whole (table/streamed-grid.ts): this thread
 * indexes the lines while the row thread hashes the file, then each parses half of the rows from
 * the file into the shared matrix. Any file the fast reader would not take (quotes, a carriage
 * return alone, bytes that are not UTF-8, ragged rows) gets `undefined`, and is read whole as
 * before, which reports what is wrong with it.
 *
 * The file is opened several times (by each thread, and for single cells later); every opening
 * must find the same file — device, inode, size and modification time as at the first — or the
 * read stops with `data-changed-while-read`: the hash and the rows must come from one file.
 */
import { createHash, type Hash } from 'node:crypto';
import { closeSync } from 'node:fs';
import type { Problem } from '../problems/problem.js';
import { changedWhileRead, fdReader, type FileIdentity, identityOf, openIdentified, reopen, sameFile } from './file-identity.js';
import { describe as describeColumns, type Described } from '../table/covariates.js';
import { SIGNATURES } from '../table/content-check.js';
import { LineIndexer, type LineIndex } from '../table/line-index.js';
import { STRETCH, streamedGrid, type ReadInto, type StretchHelper } from '../table/streamed-grid.js';

export type { FileIdentity } from './file-identity.js';
import { buildTable, type DataRoles, type RolePaths, type TableResult } from '../table/table.js';

/** Reads by opening the file each time (single cells, long after the read): it must still be the same file. */
function pathReader(path: string, identity: FileIdentity, shownAs: string): ReadInto {
  return (offset, into, length) => {
    const fd = reopen(path, identity, shownAs);
    try {
      fdReader(fd, shownAs)(offset, into, length);
    } finally {
      closeSync(fd);
    }
  };
}

/**
 * The lines of the file, read in stretches; undefined when it is not a file for the fast reader
 * (the reading stops where that shows). `hash` is given every byte, in order.
 */
export function indexLines(
  fd: number,
  size: number,
  delimiter: number,
  shownAs: string,
  options: { hash?: Hash; limit?: number } = {},
): LineIndex | undefined {
  const indexer = new LineIndexer(delimiter, size, (n) => new Float64Array(new SharedArrayBuffer(n * 8)));
  const read = fdReader(fd, shownAs);
  let buffer = new Uint8Array(Math.min(options.limit ?? STRETCH, Math.max(size, 1)));
  for (let at = 0; at < size && !indexer.refused; ) {
    const length = Math.min(buffer.length, size - at);
    read(at, buffer, length);
    const taken = indexer.take(buffer.subarray(0, length), at, at + length === size);
    // No line ends within the stretch: a longer one.
    if (taken === 0) {
      buffer = new Uint8Array(buffer.length * 2);
      continue;
    }
    if (indexer.refused) break;
    options.hash?.update(buffer.subarray(0, taken));
    at += taken;
  }
  return indexer.done();
}

/** What the other thread does for a streamed read: hash the file, and parse its share of the rows. */
export interface StreamTwin {
  /**
   * The other thread's share of the rows; `sha256` waits for the file's SHA-256, which that thread
   * reads right after its rows (at once, when it was given none): undefined when the file changed.
   */
  stretchHelper(path: string, identity: FileIdentity, ix: LineIndex, shownAs: string): StretchHelper & { sha256(): string | undefined };
}

export interface StreamedTable {
  sha256: string;
  built: TableResult & { described?: Described };
}

export function readStreamed(
  path: string,
  shownAs: string,
  delimiter: number,
  roles: DataRoles,
  locate: (role: keyof RolePaths, index?: number) => Problem['position'],
  twin: StreamTwin | undefined,
  beforeRows: () => void,
): StreamedTable | undefined {
  const opened = openIdentified(path);
  if (!opened) return undefined;
  const { fd, identity } = opened;
  try {
    // A compressed or binary file is read whole (and decoded or reported): not worth hashing twice.
    const head = new Uint8Array(Math.min(8, identity.size));
    fdReader(fd, shownAs)(0, head, head.length);
    if (head.length === 0 || SIGNATURES.some(([, magic]) => magic.every((b, i) => head[i] === b))) return undefined;
    // Alone, the index pass hashes the file; with another thread, that thread hashes it once it has
    // parsed its share of the rows (the hash is wanted only after the table is built).
    const here = twin ? undefined : createHash('sha256');
    const ix = indexLines(fd, identity.size, delimiter, shownAs, { hash: here });
    if (!ix) return undefined;
    beforeRows();
    const helper = twin?.stretchHelper(path, identity, ix, shownAs);
    const grid = streamedGrid(ix, { rows: fdReader(fd, shownAs), cells: pathReader(path, identity, shownAs) }, helper);
    const built = buildTable(grid, roles, shownAs, locate);
    const sha256 = here ? here.digest('hex') : helper!.sha256();
    if (sha256 === undefined || !sameFile(identityOf(fd), identity)) throw changedWhileRead(shownAs);
    if (built.ragged) return undefined;
    return {
      sha256,
      built: roles.keepOtherColumns && built.table ? { ...built, described: describeColumns(grid, built.table, roles, shownAs) } : built,
    };
  } finally {
    closeSync(fd);
  }
}
