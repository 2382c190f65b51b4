/**
 * A second thread for reading large quote-free tables: it parses the upper half of the rows
 * while the main thread parses the lower half, both straight into one shared array. The main
 * thread waits for it synchronously (Atomics.wait), so the pure table builder stays synchronous.
 */
import { availableParallelism } from 'node:os';
import { heapFlagsForWorker } from './heap-flags.js';
import { MessageChannel, type MessagePort, receiveMessageOnPort, Worker } from 'node:worker_threads';
import { forcedThreads } from './threads.js';
import { deriveKeys } from '../split/key.js';
import { changedWhileRead, type FileIdentity, sameFile } from './file-identity.js';
import type { LineIndex } from '../table/line-index.js';
import type { RowHelper, RowsPart } from '../table/plain.js';
import type { ParquetTwin } from './parquet.js';
import type { NumberColumnsDone } from './parquet-pages.js';
import type { FoldThreadData } from './fold-jobs.js';
import type { StreamTwin } from './streamed-read.js';
import type { StretchRows } from '../table/streamed-grid.js';

/**
 * Files below this size read faster on one thread than a worker takes to start: a plain table
 * (read in stretches, never whole), and a Parquet file (read whole, half its columns decoded on
 * the other thread).
 */
export const SHARED_READ_BYTES = 24 * 1024 * 1024;
export const SHARED_PARQUET_BYTES = 8 * 1024 * 1024;

export interface RowThread extends RowHelper, ParquetTwin, StreamTwin {
  /** Starts SHA-256 of bytes on the other thread; the returned function waits for the hex digest. */
  sha256(bytes: Uint8Array): () => string;
  /** deriveKeys(ids, seed, repeat), the second half of the ids on the other thread. */
  keys(ids: readonly string[], seed: number, repeat: number): Uint8Array;
  /**
   * Before parsing: the ids will be in column `idColumn` and need keys for these repeats. The
   * other thread then derives the keys of the ids it parses right after parsing them.
   */
  expectKeys(plan: { idColumn: string; seed: number; repeats: number }): void;
  /**
   * The table's ids are known before the table is built (a decoded Parquet file): the other
   * thread derives the keys of the second half of them for every repeat meanwhile.
   */
  keysAhead(ids: readonly string[], seed: number, repeats: number): void;
  /** The other thread will fit folds after the read: it loads that code meanwhile, to be ready for `folds`. */
  prepareFolds(): void;
  /** The other thread fits fold jobs as a fold worker does, its fits and errors posted to `port`. */
  folds(data: FoldThreadData, port: MessagePort): void;
  /**
   * Before the protocol is read (early-row-thread.ts): the other thread indexes the lines of this
   * file, as the streamed read would with this delimiter, and makes room for its numbers.
   */
  indexEarly(path: string, delimiter: number): void;
  indexed: NonNullable<StreamTwin['indexed']>;
  /** The early index is wanted soon (or not at all): the other thread stops touching the room for the numbers. */
  indexWanted(): void;
  /** Whether the thread keeps the process alive (a thread started early, not yet taken, does not). */
  hold(keep: boolean): void;
  close(): Promise<void>;
}

/**
 * Only from compiled JavaScript (the worker loads dist/), on a machine with a second core.
 * FOLDSEAL_THREADS=1 turns it off; 2 or more turns it on for any size (as the tests do).
 */
export function rowThreadsAvailable(size: number, parquet = false): boolean {
  if (!import.meta.url.endsWith('.js')) return false;
  const forced = forcedThreads();
  if (forced !== undefined) return forced >= 2;
  return size >= (parquet ? SHARED_PARQUET_BYTES : SHARED_READ_BYTES) && availableParallelism() >= 2;
}

/**
 * Where bin/foldseal.cjs leaves the row thread it starts for `run` before it loads the program (a
 * worker takes 60–100 ms to start; it spends them while the program loads): the worker, on
 * row-worker.js with the command line's heap flags, and this end of its channel.
 */
const PRESTARTED = Symbol.for('foldseal.rowThread');
type Prestarted = { worker: Worker; port: MessagePort };

function takePrestarted(): Prestarted | undefined {
  const g = globalThis as Record<symbol, Prestarted | undefined>;
  const p = g[PRESTARTED];
  g[PRESTARTED] = undefined;
  return p;
}

function launch(parquet: boolean): Prestarted {
  const { port1, port2 } = new MessageChannel();
  const worker = new Worker(new URL('./row-worker.js', import.meta.url), {
    workerData: { port: port2, parquet, ...heapFlagsForWorker() },
    transferList: [port2],
  });
  return { worker, port: port1 };
}

/** Closes the launcher's row thread when the run will not use it (a small table, a wrong guess). */
export async function dropPrestartedRowThread(): Promise<void> {
  const p = takePrestarted();
  p?.port.close();
  await p?.worker.terminate();
}

/** Started early (before the file is read) so the worker is loaded by the time rows are parsed. */
export function startRowThread(options: { parquet?: boolean } = {}): RowThread {
  const { worker, port: port1 } = takePrestarted() ?? launch(options.parquet === true);
  // Jobs run in order and each answers once, errors included; answers are matched by id.
  let nextId = 0;
  const answers = new Map<number, Record<string, unknown>>();
  const post = (job: Record<string, unknown>) => {
    const id = nextId++;
    const done = new Int32Array(new SharedArrayBuffer(4));
    worker.postMessage({ ...job, id, done });
    let reply: Record<string, unknown> | undefined;
    return () => (reply ??= answerOf(id, done));
  };
  const answerOf = (id: number, done: Int32Array): Record<string, unknown> => {
    while (Atomics.load(done, 0) === 0) Atomics.wait(done, 0, 0, 1000);
    for (let m = receiveMessageOnPort(port1); m; m = receiveMessageOnPort(port1))
      answers.set((m.message as { id: number }).id, m.message as Record<string, unknown>);
    const reply = answers.get(id) as { error?: string } | undefined;
    answers.delete(id);
    /* c8 ignore next -- a failure inside the worker is a bug in foldseal */
    if (!reply || reply.error !== undefined) throw new Error(`foldseal: row thread failed: ${reply?.error ?? 'no reply'}`);
    return reply as Record<string, unknown>;
  };
  let plan: { idColumn: string; seed: number; repeats: number } | undefined;
  let earlyIndex: { path: string; delimiter: number; stop: Int32Array; wait: () => Record<string, unknown> } | undefined;
  /**
   * Keys the other thread derives for the ids of rows [from, to), all repeats, once its rows are
   * parsed: written where they belong in `out` (repeat r's keys of all `to` rows at (r − 1)·to·32),
   * whose rows [0, from) this thread fills in place when the keys are asked for.
   */
  let early:
    | { seed: number; from: number; to: number; out: Uint8Array; wait: () => unknown; parsed: boolean; ids?: readonly string[] }
    | undefined;
  /**
   * With a plan (expectKeys), the other thread derives the keys of the ids it parses right after
   * parsing them: rows [from, to), `from` known only once they are parsed when the threads claim
   * stretches (the room is then for every row; only what is written is touched).
   */
  const keysAfterRows = (header: readonly string[], textCols: readonly number[], from: number, to: number) => {
    const slot = plan ? textCols.indexOf(header.indexOf(plan.idColumn)) : -1;
    if (!plan || slot < 0) return;
    const out = new Uint8Array(new SharedArrayBuffer(plan.repeats * to * 32));
    early = {
      seed: plan.seed,
      from,
      to,
      out,
      wait: post({ kind: 'keys-of-rows', slot, textCount: textCols.length, seed: plan.seed, repeats: plan.repeats, rows: to, out }),
      parsed: false,
    };
  };
  return {
    numbers: (length) => new Float64Array(new SharedArrayBuffer(length * 8)),
    expectKeys(p) {
      plan = p;
    },
    indexEarly(path, delimiter) {
      const stop = new Int32Array(new SharedArrayBuffer(4));
      earlyIndex = { path, delimiter, stop, wait: post({ kind: 'index-file', path, delimiter, stop }) };
    },
    indexWanted() {
      if (earlyIndex) Atomics.store(earlyIndex.stop, 0, 1);
    },
    indexed(path, identity, delimiter) {
      const e = earlyIndex;
      earlyIndex = undefined;
      if (e === undefined) return undefined;
      // The other thread stops touching the numbers' pages: the rows are wanted now.
      Atomics.store(e.stop, 0, 1);
      if (e.path !== path || e.delimiter !== delimiter) return undefined;
      const r = e.wait() as { identity?: FileIdentity; index?: LineIndex; numbers?: SharedArrayBuffer };
      // The same file as this thread opened (device, inode, size, modification time), else not used.
      return r.index && r.identity && sameFile(r.identity, identity) ? { ix: r.index, numbers: r.numbers } : undefined;
    },
    sha256(bytes) {
      const wait = post({ kind: 'hash', bytes });
      return () => wait().sha256 as string;
    },
    parquet(job) {
      const wait = post({ kind: 'parquet', ...job });
      return () => wait() as unknown as NumberColumnsDone;
    },
    start(t, numberCols, textCols, from, to, numbers) {
      const table = {
        bytes: t.bytes,
        delimiter: t.delimiter,
        header: t.header,
        rows: t.rows,
        cols: t.cols,
        rowStart: t.rowStart,
        rowEnd: t.rowEnd,
      };
      const wait = post({ kind: 'rows', table, numberCols, textCols, from, to, numbers });
      keysAfterRows(t.header, textCols, from, to);
      return () => {
        const part = wait().part as RowsPart | undefined;
        if (early) early.parsed = part !== undefined;
        return part;
      };
    },
    stretchHelper(path, identity, ix, shownAs, room) {
      // The line index is handed on once and not held here: V8's call feedback can keep these
      // closures (and what they hold) alive for the whole process.
      const { header, rows } = ix;
      let index: object | undefined = { rowStart: ix.rowStart, rowEnd: ix.rowEnd, delimiter: ix.delimiter, cols: ix.cols, rows };
      let hashed: (() => Record<string, unknown>) | undefined;
      return {
        numbers: (length) =>
          room && room.byteLength >= length * 8 ? new Float64Array(room, 0, length) : new Float64Array(new SharedArrayBuffer(length * 8)),
        claims: (length) => new Int32Array(new SharedArrayBuffer(length * 4)),
        // The hash is wanted once the table is built: the other thread takes it after its rows (before their keys).
        sha256: () => (hashed ?? post({ kind: 'hash-file', path, identity }))().sha256 as string | undefined,
        start(numberCols, textCols, claims, numbers) {
          const wait = post({ kind: 'rows-file', path, identity, index, numberCols, textCols, claims, numbers });
          index = undefined;
          hashed = post({ kind: 'hash-file', path, identity });
          keysAfterRows(header, textCols, -1, rows);
          return () => {
            const reply = wait() as { part?: StretchRows; changed?: true };
            if (reply.changed) throw changedWhileRead(shownAs);
            if (early) {
              early.parsed = reply.part !== undefined;
              if (reply.part) early.from = reply.part.from;
            }
            return reply.part;
          };
        },
      };
    },
    keysAhead(ids, seed, repeats) {
      const from = ids.length >> 1;
      const out = new Uint8Array(new SharedArrayBuffer(repeats * ids.length * 32));
      const upper = ids.slice(from);
      early = {
        seed,
        from,
        to: ids.length,
        out,
        wait: post({ kind: 'keys-of-ids', ids: upper, seed, repeats, from, rows: ids.length, out }),
        parsed: true,
        ids: upper,
      };
    },
    keys(ids, seed, repeat) {
      const same = (e: NonNullable<typeof early>) => e.ids === undefined || e.ids.every((id, i) => id === ids[e.from + i]);
      if (early?.parsed && early.seed === seed && early.to === ids.length && same(early)) {
        // The ids are the ones both threads just parsed: only the first part is left to derive here, in place.
        const { from, to } = early;
        const out = early.out.subarray((repeat - 1) * to * 32, repeat * to * 32);
        deriveKeys(ids, seed, repeat, { out, at: 0, from: 0, to: from });
        early.wait();
        return out;
      }
      const out = new Uint8Array(new SharedArrayBuffer(ids.length * 32));
      const mid = ids.length >> 1;
      const wait = post({ kind: 'keys', ids: ids.slice(mid), seed, repeat, out: out.subarray(mid * 32) });
      deriveKeys(ids, seed, repeat, { out, at: 0, from: 0, to: mid });
      wait();
      return out;
    },
    prepareFolds() {
      worker.postMessage({ kind: 'prepare-folds' });
    },
    folds(data, port) {
      // The split is made by now: the keys derived during the read are not needed any more.
      early = undefined;
      worker.postMessage({ kind: 'folds', data, port }, [port]);
    },
    hold(keep) {
      if (keep) worker.ref();
      else worker.unref();
    },
    async close() {
      // Nothing this thread shared (keys, the read's plan) outlives it.
      early = undefined;
      plan = undefined;
      earlyIndex = undefined;
      port1.close();
      await worker.terminate();
    },
  };
}
