/**
 * V8 flags the command line sets for its own process (cli/main.ts). Starting a worker thread puts
 * V8's flags back to the ones node was started with, so each of foldseal's workers sets them again
 * first thing (worker-start.ts). A program that uses foldseal as a library and sets none gets none.
 */
import { setFlagsFromString } from 'node:v8';

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
