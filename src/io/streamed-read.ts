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
import { createHash } from 'node:crypto';
import { closeSync } from 'node:fs';
import type { Problem } from '../problems/problem.js';
import { changedWhileRead, fdReader, type FileIdentity, identityOf, openIdentified, reopen, sameFile } from './file-identity.js';
import { describe as describeColumns, type Described } from '../table/covariates.js';
import type { LineIndex } from '../table/line-index.js';
import { indexLines, plainFileHead } from './index-lines.js';
export { indexLines } from './index-lines.js';
import { streamedGrid, type ReadInto, type StretchHelper } from '../table/streamed-grid.js';

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

/** What the other thread does for a streamed read: hash the file, and parse its share of the rows. */
export interface StreamTwin {
  /**
   * The other thread's share of the rows; `sha256` waits for the file's SHA-256, which that thread
   * reads right after its rows (at once, when it was given none): undefined when the file changed.
   */
  stretchHelper(
    path: string,
    identity: FileIdentity,
    ix: LineIndex,
    shownAs: string,
    /** Room for the numbers made already (its first part at least): used when it is large enough. */
    room?: SharedArrayBuffer,
  ): StretchHelper & { sha256(): string | undefined };
  /**
   * The line index the other thread made of this very file before the protocol was read
   * (RowThread.indexEarly), and room for its numbers, if it did.
   */
  indexed?(path: string, identity: FileIdentity, delimiter: number): { ix: LineIndex; numbers?: SharedArrayBuffer } | undefined;
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
    if (!plainFileHead(fd, identity.size, shownAs)) return undefined;
    // Alone, the index pass hashes the file; with another thread, that thread hashes it once it has
    // parsed its share of the rows (the hash is wanted only after the table is built).
    // The other thread may have indexed it already, started before the protocol was read.
    const early = twin?.indexed?.(path, identity, delimiter);
    const here = twin ? undefined : createHash('sha256');
    const ix = early?.ix ?? indexLines(fd, identity.size, delimiter, shownAs, { hash: here });
    if (!ix) return undefined;
    beforeRows();
    const helper = twin?.stretchHelper(path, identity, ix, shownAs, early?.numbers);
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
