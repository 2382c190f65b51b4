/**
 * V8 flags the command line sets for its own process (cli/main.ts). Starting a worker thread puts
 * V8's flags back to the ones node was started with, so each of foldseal's workers sets them again
 * first thing (worker-start.ts). A program that uses foldseal as a library and sets none gets none.
 */
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';

/**
 * The command line's flags. A run's numbers live in typed arrays outside V8's heap, and what the
 * heap holds of a table (ids, labels) lives as long as the run. V8's young generation, which
 * otherwise grows to 3 × 16 MB while such a table is read, then only adds to the peak memory (some
 * 30 MB on a million rows), and a table of 100,000 rows reads no slower without it: it keeps its
 * starting size. `--expose-gc` gives collectGarbage its collector (see there). V8 accepts a code
 * cache only under the flags it was made with, so the build makes its caches under these
 * (scripts/compile-schemas.mjs, scripts/bundle.mjs).
 */
export const CLI_HEAP_FLAGS = '--semi-space-growth-factor=1 --expose-gc';

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

/**
 * Cells (rows × features) from which a run collects its garbage between phases. A typed array's
 * memory goes back only when V8 collects its object, which it does once some 64 MB of such
 * memory has piled up since the last full collection: on 1,000,000 × 50 the peak resident set
 * moved by that much from run to run (639–676 MiB), with three collections it stays at 636–654
 * MiB. A full collection costs some 40–70 ms there (the million ids are marked each time); below
 * this size memory is not the constraint.
 */
export const COLLECT_FROM_CELLS = 20_000_000;

let collector: (() => void) | null | undefined;

/** A full collection when the command line chose `--expose-gc` and the table has COLLECT_FROM_CELLS cells or more. */
export function collectGarbage(cells: number): void {
  if (cells < COLLECT_FROM_CELLS) return;
  // A context made after the flag is set has the collector (the first one was made before).
  collector ??= chosen?.split(' ').includes('--expose-gc') ? (runInNewContext('gc') as () => void) : null;
  collector?.();
}
