/**
 * The row thread of `run`, started before the command loads its modules (some 150 ms), so that
 * it is ready when the data file is read. Started only when a quick look at the protocol
 * (dataSectionGuess) finds a data file the protocol may read (the same path policy) that is large
 * enough for two threads. That thread indexes the file's lines meanwhile and makes room for its
 * numbers (the same path policy holds: nothing is read that the run would not read). validateProtocol takes the thread
 * over when it reads that same file, and closes it otherwise; the command closes one never taken.
 * A wrong guess costs a thread's start-up, never a result. The launcher (bin/foldseal.cjs) may
 * have started the thread already, before loading the program: it is taken over here, or closed.
 */
import { closeSync, openSync, readSync, statSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { dataSectionGuess } from '../protocol/data-file-guess.js';
import { delimiterFor } from '../table/delimiter.js';
import { outsideProblem, protocolPolicy } from './path-policy.js';
import { dropPrestartedRowThread, type RowThread, rowThreadsAvailable, startRowThread } from './row-helper.js';

let early: { path: string; parquet: boolean; thread: RowThread } | undefined;

export function startEarlyRowThread(protocolPath: string, allowOutside: boolean): void {
  try {
    const guess = dataSectionGuess(protocolHead(protocolPath));
    if (guess === undefined) return;
    const { file } = guess;
    const path = resolve(dirname(resolve(protocolPath)), file);
    if (outsideProblem(path, protocolPolicy(protocolPath, allowOutside), file, 'data file', {})) return;
    // The extension stands in for the magic bytes here (validateProtocol reads those).
    const parquet = /\.parquet$/i.test(path);
    if (!rowThreadsAvailable(statSync(path).size, parquet)) return;
    // The launcher's thread, when it started one (row-helper.ts), else a new one.
    const thread = startRowThread({ parquet });
    // A plain table read in stretches: its lines are indexed at once, while this thread loads the run's code.
    if (!parquet && guess.plain) thread.indexEarly(path, delimiterFor(path));
    // Not taken yet: it does not keep the process alive on its own.
    thread.hold(false);
    early = { path, parquet, thread };
  } catch {
    // Anything unusual (no such file, an unreadable protocol) is validateProtocol's to report.
  } finally {
    // A thread the launcher started and this run does not take goes now (nothing waits for it).
    void dropPrestartedRowThread();
  }
}

/** The protocol's first 64 KB, enough for any data mapping (a data file named as the protocol by mistake is not read whole here). */
function protocolHead(path: string): string {
  const fd = openSync(path, 'r');
  try {
    const head = Buffer.alloc(1 << 16);
    return head.toString('utf8', 0, readSync(fd, head, 0, head.length, 0));
  } finally {
    closeSync(fd);
  }
}

/** The early thread when it was started for this file as read (else it is closed, and undefined). */
export async function takeEarlyRowThread(path: string, parquet: boolean): Promise<RowThread | undefined> {
  const e = early;
  early = undefined;
  if (e === undefined) return undefined;
  if (e.path === path && e.parquet === parquet) {
    e.thread.hold(true);
    // The file is about to be read: the thread stops making room for the numbers (a read that
    // does not take its index would otherwise wait behind that).
    e.thread.indexWanted();
    return e.thread;
  }
  await e.thread.close();
  return undefined;
}

/** Closes an early thread nobody took (a protocol that failed before its data was read). */
export async function closeEarlyRowThread(): Promise<void> {
  const e = early;
  early = undefined;
  await Promise.all([e?.thread.close(), dropPrestartedRowThread()]);
}
