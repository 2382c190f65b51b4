/** The line index of a plain table file, made by reading it in stretches (streamed-read.ts; the row thread, early). */
import type { Hash } from 'node:crypto';
import { LineIndexer, type LineIndex } from '../table/line-index.js';
import { STRETCH } from '../table/streamed-grid.js';
import { SIGNATURES } from '../table/content-check.js';
import { fdReader } from './file-identity.js';

/** Whether the file may be read in stretches: not empty, and no compressed or binary signature at its start (those are read whole, decoded or reported). */
export function plainFileHead(fd: number, size: number, shownAs: string): boolean {
  const head = new Uint8Array(Math.min(8, size));
  fdReader(fd, shownAs)(0, head, head.length);
  return head.length > 0 && !SIGNATURES.some(([, magic]) => magic.every((b, i) => head[i] === b));
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
