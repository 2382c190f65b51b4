/**
 * Computes the permuted scores of a permutation test on worker threads when the job is large
 * enough to pay for them. Every worker runs the same pure permutedScores on the same inputs for a
 * range of permutation numbers, and the ranges are put back in order, so the scores (and so the
 * p-value and the null quantiles) are identical to the serial loop's.
 */
import { availableParallelism } from 'node:os';
import { heapFlagsForWorker } from './heap-flags.js';
import { Worker } from 'node:worker_threads';
import { fromWorkerError, type WorkerError } from './worker-errors.js';
import type { Protocol } from '../protocol/types.js';
import { permutedScores } from '../run/permutation.js';
import type { Assignment } from '../split/assignment.js';
import type { Table } from '../table/table.js';
import { forcedThreads } from './threads.js';

/**
 * Cells × folds × permutations below which threads cost more than they save. Each worker boots
 * and compiles the fitting code afresh (≈ 0.4 s of CPU here); measured on this project's 2-core
 * machine, 500 × 100 × 5 folds × 1,000 permutations (2.5e8) ran 5–10 % slower on two threads
 * than on one, and 3,000 × 200 × 5 × 200 (6e8) 5–10 % faster.
 */
const MIN_WORK = 400_000_000;

export type PermutationProgress = (done: number, total: number) => void;

export function permutationThreads(p: Protocol, table: Table, a: Assignment): number {
  const count = p.statistics?.permutation?.count ?? 0;
  const forced = forcedThreads();
  if (forced !== undefined) return Math.min(forced, Math.max(1, count));
  // Workers load compiled JavaScript; from TypeScript sources (tests) the serial loop runs.
  /* c8 ignore next -- the tests run from TypeScript sources; the compiled path is covered by the CLI tests */
  if (!import.meta.url.endsWith('.js')) return 1;
  if (table.X.rows * table.X.cols * a.folds * a.repeats * count < MIN_WORK) return 1;
  return Math.max(1, Math.min(availableParallelism(), count, 8));
}

/** Ranges of permutation numbers, small enough that the threads finish close together. */
export function permutationChunks(count: number, threads: number): [number, number][] {
  const size = Math.max(1, Math.ceil(count / (threads * 8)));
  const out: [number, number][] = [];
  for (let from = 1; from <= count; from += size) out.push([from, Math.min(count, from + size - 1)]);
  return out;
}

/** Every permuted score, in permutation order; undefined when the protocol declares no permutation test. */
export async function permutedScoresInWorkers(
  p: Protocol,
  table: Table,
  a: Assignment,
  onProgress?: PermutationProgress,
): Promise<Float64Array | undefined> {
  const count = p.statistics?.permutation?.count;
  if (!count) return undefined;
  const threads = permutationThreads(p, table, a);
  const chunks = permutationChunks(count, threads);
  const scores = new Float64Array(count);
  let next = 0;
  let done = 0;
  let failed: unknown;
  const take = (index: number, part: Float64Array) => {
    scores.set(part, chunks[index][0] - 1);
    done += part.length;
    onProgress?.(done, count);
  };
  // This thread computes chunks too: it is warm from the cross-validation and starts at once,
  // while the workers boot. threads - 1 workers keep one compute thread per core.
  // Each worker gets its own copy of the table: measured on this 2-core machine, two threads
  // reading one SharedArrayBuffer ran each permutation about twice as slowly as one thread did.
  const workerData = { protocol: p, table, assignment: a };
  const workers = Array.from(
    { length: threads - 1 },
    () => new Worker(new URL('./permutation-worker.js', import.meta.url), { workerData: { ...workerData, ...heapFlagsForWorker() } }),
  );
  const finished = new Promise<void>((resolve, reject) => {
    const feed = (w: Worker) => {
      if (next < chunks.length) w.postMessage({ index: next, range: chunks[next++] });
    };
    for (const w of workers) {
      w.on('message', (m: { index: number; scores?: Float64Array; error?: WorkerError }) => {
        if (m.error) {
          failed = fromWorkerError(m.error);
          reject(failed);
          return;
        }
        take(m.index, m.scores!);
        if (done === count) resolve();
        else feed(w);
      });
      w.on('error', (e) => {
        failed = e;
        reject(e);
      });
      feed(w);
    }
  });
  finished.catch(() => {});
  try {
    while (next < chunks.length && failed === undefined) {
      const index = next++;
      take(index, permutedScores(p, table, a, chunks[index][0], chunks[index][1]));
      // Let the workers' messages in between chunks.
      await new Promise<void>((r) => setImmediate(r));
    }
    if (done < count) await finished;
    else if (failed !== undefined) throw failed;
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return scores;
}
