/** The line index of a plain table file, made by reading it in stretches (streamed-read.ts; the row thread, early). */
import type { Hash } from 'node:crypto';
import { LineIndexer, type LineIndex } from '../table/line-index.js';
import { STRETCH } from '../table/streamed-grid.js';
import { fdReader } from './file-identity.js';

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
