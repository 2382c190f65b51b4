/**
 * V8 flags the command line sets for its own process (cli/main.ts). Starting a worker thread puts
 * V8's flags back to the ones node was started with, so each of foldseal's workers sets them again
 * first thing (worker-start.ts). A program that uses foldseal as a library and sets none gets none.
 */
import { setFlagsFromString } from 'node:v8';

/**
 * The command line's flags. A run's numbers live in typed arrays outside V8's heap, and what the
 * heap holds of a table (ids, labels) lives as long as the run. V8's young generation, which
 * otherwise grows to 3 × 16 MB while such a table is read, then only adds to the peak memory (some
 * 30 MB on a million rows), and a table of 100,000 rows reads no slower without it: it keeps its
 * starting size. V8 accepts a code cache only under the flags it was made with, so the build makes
 * its caches under these (scripts/compile-schemas.mjs).
 */
export const CLI_HEAP_FLAGS = '--semi-space-growth-factor=1';

let chosen: string | undefined;

/** Sets the flags in this process, and in every worker foldseal starts from now on. */
export function useHeapFlags(flags: string): void {
  chosen = flags;
  setFlagsFromString(flags);
}

/** The part of a worker's workerData that carries the flags to worker-start.ts. */
export function heapFlagsForWorker(): { heapFlags?: string } {
  return chosen === undefined ? {} : { heapFlags: chosen };
}
