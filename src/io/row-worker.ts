/**
 * Worker thread entry: hashes the file, parses the rows, decodes a share of a Parquet file's
 * numeric columns, or derives the split keys it is sent (see row-helper.ts).
 */
import './worker-start.js';
import { createHash } from 'node:crypto';
import { workerData, parentPort, type MessagePort } from 'node:worker_threads';
import { deriveKeys } from '../split/key.js';
import type { PlainTable } from '../table/plain.js';
import { decodeSpan } from '../table/grid.js';
import { extractRows, type RowsPart } from '../table/plain-rows.js';
import type { ParquetTwin } from './parquet.js';
import type { NumberColumnsDone } from './parquet-pages.js';
import type { FoldThreadData } from './fold-jobs.js';
import { closeSync } from 'node:fs';
import { FoldsealError } from '../problems/problem.js';
import { fdReader, openedAgain, openIdentified, type FileIdentity } from './file-identity.js';
import { indexLines, plainFileHead } from './index-lines.js';
import type { LineIndex } from '../table/line-index.js';
import { extractStretches, STRETCH, type StretchClaims } from '../table/streamed-grid.js';

const { port, parquet } = workerData as { port: MessagePort; parquet: boolean };

// The modules that decode a Parquet file, loaded while the main thread still reads it.
const parquetModules = () => Promise.all([import('./parquet-pages.js'), import('./parquet-codecs.js')]);
const loading = parquet ? parquetModules() : undefined;

type Job = { id: number; done: Int32Array } & (
  | { kind: 'hash'; bytes: Uint8Array }
  | { kind: 'rows'; table: PlainTable; numberCols: number[]; textCols: number[]; from: number; to: number; numbers: Float64Array }
  | { kind: 'keys'; ids: string[]; seed: number; repeat: number; out: Uint8Array }
  | { kind: 'keys-of-rows'; slot: number; textCount: number; seed: number; repeats: number; rows: number; out: Uint8Array }
  | { kind: 'keys-of-ids'; ids: string[]; seed: number; repeats: number; from: number; rows: number; out: Uint8Array }
  | ({ kind: 'parquet' } & Parameters<ParquetTwin['parquet']>[0])
  | { kind: 'hash-file'; path: string; identity: FileIdentity }
  | { kind: 'index-file'; path: string; delimiter: number; stop: Int32Array }
  | {
      kind: 'rows-file';
      path: string;
      identity: FileIdentity;
      index: Pick<LineIndex, 'rowStart' | 'rowEnd' | 'delimiter' | 'cols' | 'rows'>;
      numberCols: number[];
      textCols: number[];
      claims: StretchClaims;
      numbers: Float64Array;
    }
);

/** The share of a Parquet file's numeric columns this thread was given; a broken file is an answer, not a failure. */
async function parquetShare(job: Extract<Job, { kind: 'parquet' }>): Promise<NumberColumnsDone> {
  job.numbers.fill(0, job.touch[0], job.touch[1]);
  Atomics.store(job.ready, 0, 1);
  Atomics.notify(job.ready, 0);
  const [{ decodeNumberColumns }, { decompress }] = await (loading ?? parquetModules());
  // The main thread touches the first rows: no value is written there before it has.
  while (Atomics.load(job.ready, 1) === 0) Atomics.wait(job.ready, 1, 0, 1000);
  return decodeNumberColumns(job.file, job.footer, job.cols, job.slots, job.numbers, job.width, decompress, job.claim);
}

// The last rows job's table, result and first row, for the keys of the ids it parsed.
let last: { table: PlainTable; part: RowsPart | undefined; from: number } | undefined;

/**
 * After the read: this thread, already started, fits folds as a fold worker does. Its code is
 * loaded on the first word (`prepare-folds`, sent as the file starts to be read, when `run`
 * keeps this thread), and the folds come with a port of their own for the fits.
 */
type FoldsMessage = { kind: 'prepare-folds' } | { kind: 'folds'; data: FoldThreadData; port: MessagePort };
let foldJobs: Promise<typeof import('./fold-jobs.js')> | undefined;

async function folds(m: FoldsMessage): Promise<void> {
  foldJobs ??= import('./fold-jobs.js');
  if (m.kind === 'prepare-folds') return;
  // The parsed rows are not needed any more: let the file's bytes go.
  last = undefined;
  try {
    const { fitClaimedJobs } = await foldJobs;
    fitClaimedJobs(m.data, (message, transfer) => m.port.postMessage(message, transfer));
  } catch (e) {
    /* c8 ignore next 2 -- the fold code failed to load: a bug in foldseal, reported rather than left waiting */
    m.port.postMessage({ index: -1, error: { message: String((e as Error).stack ?? e) } });
  }
}

// Jobs run one at a time, in the order they came (a Parquet share waits for its modules).
let queue = Promise.resolve();
parentPort!.on('message', (job: Job | FoldsMessage) => {
  queue = queue.then(() => (job.kind === 'prepare-folds' || job.kind === 'folds' ? folds(job) : run(job)));
});

/** SHA-256 of the file read in stretches into one buffer; undefined when it is not the same file any more. */
function fileSha256(path: string, identity: FileIdentity): string | undefined {
  const fd = openedAgain(path, identity);
  if (fd === undefined) return undefined;
  try {
    const hash = createHash('sha256');
    const buffer = new Uint8Array(Math.min(STRETCH, Math.max(identity.size, 1)));
    const read = fdReader(fd, path);
    for (let at = 0; at < identity.size; at += buffer.length) {
      const length = Math.min(buffer.length, identity.size - at);
      read(at, buffer, length);
      hash.update(buffer.subarray(0, length));
    }
    return hash.digest('hex');
  } catch {
    return undefined;
  } finally {
    closeSync(fd);
  }
}

/**
 * The line index of a file, made before the protocol is read (as streamed-read.ts would make it
 * with this delimiter), and room for its numbers: nothing for a file the fast reader would not take.
 */
function indexEarly(
  path: string,
  delimiter: number,
  stop: Int32Array,
): { identity?: FileIdentity; index?: LineIndex; numbers?: SharedArrayBuffer } {
  const opened = openIdentified(path);
  if (!opened) return {};
  const { fd, identity } = opened;
  try {
    if (!plainFileHead(fd, identity.size, path)) return {};
    // Not hashed here: the hash is wanted only once the table is built, and is taken after this thread's rows.
    const index = indexLines(fd, identity.size, delimiter, path);
    return index ? { identity, index, numbers: touchedNumbers(index, stop) } : {};
  } catch {
    // A file that shrank under the read: the main thread reads it again and reports it.
    return {};
  } finally {
    closeSync(fd);
  }
}

/**
 * Room for the table's numbers, its pages touched while the main thread still loads its code:
 * a new page costs the kernel a fault on first write (some 3 ms per MB here), and faults of two
 * threads into one array wait for each other. Room for every column but one (the label is never a
 * feature); touched up to every column but two (an id and the label), and only until the main
 * thread asks for the index (`stop`): what is left is touched as the rows are parsed.
 */
function touchedNumbers(ix: LineIndex, stop: Int32Array): SharedArrayBuffer | undefined {
  if (ix.cols < 3 || ix.rows === 0) return undefined;
  const room = new SharedArrayBuffer(ix.rows * (ix.cols - 1) * 8);
  const bytes = new Uint8Array(room);
  const touch = ix.rows * (ix.cols - 2) * 8;
  for (let at = 0; at < touch && Atomics.load(stop, 0) === 0; at += 1 << 20) {
    const end = Math.min(touch, at + (1 << 20));
    for (let page = at; page < end; page += 4096) bytes[page] = 0;
  }
  return room;
}

async function run(job: Job): Promise<void> {
  try {
    if (job.kind === 'parquet') port.postMessage({ id: job.id, ...(await parquetShare(job)) });
    else if (job.kind === 'hash') port.postMessage({ id: job.id, sha256: createHash('sha256').update(job.bytes).digest('hex') });
    else if (job.kind === 'hash-file') port.postMessage({ id: job.id, sha256: fileSha256(job.path, job.identity) });
    else if (job.kind === 'index-file') port.postMessage({ id: job.id, ...indexEarly(job.path, job.delimiter, job.stop) });
    else if (job.kind === 'rows-file') {
      const fd = openedAgain(job.path, job.identity);
      if (fd === undefined) port.postMessage({ id: job.id, changed: true });
      else {
        try {
          const part = extractStretches(job.index, job.numberCols, job.textCols, job.claims, job.numbers, fdReader(fd, job.path));
          last = { table: { bytes: part?.arena } as PlainTable, part, from: part?.from ?? 0 };
          port.postMessage({ id: job.id, part });
        } catch (e) {
          // The file shrank under the read: that is the main thread's to report.
          if (!(e instanceof FoldsealError)) throw e;
          port.postMessage({ id: job.id, changed: true });
        } finally {
          closeSync(fd);
        }
      }
    } else if (job.kind === 'rows') {
      const part = extractRows(job.table, job.numberCols, job.textCols, job.from, job.to, job.numbers);
      last = { table: job.table, part, from: job.from };
      port.postMessage({ id: job.id, part });
    } else if (job.kind === 'keys-of-ids') {
      // Each repeat's keys where these rows' keys belong among all the rows'.
      const { ids, out, rows, from } = job;
      for (let r = 0; r < job.repeats; r++) deriveKeys(ids, job.seed, r + 1, { out, at: (r * rows + from) * 32, from: 0, to: ids.length });
      port.postMessage({ id: job.id });
    } else if (job.kind === 'keys-of-rows') {
      // Ragged rows: nothing was parsed, and the caller does not use these keys.
      if (last?.part) {
        const spans = last.part.spans;
        const ids: string[] = [];
        for (let o = job.slot * 2; o < spans.length; o += job.textCount * 2) ids.push(decodeSpan(last.table.bytes, spans[o], spans[o + 1]));
        const { out, rows } = job;
        const from = last.from;
        for (let r = 0; r < job.repeats; r++)
          deriveKeys(ids, job.seed, r + 1, { out, at: (r * rows + from) * 32, from: 0, to: ids.length });
      }
      port.postMessage({ id: job.id });
    } else {
      deriveKeys(job.ids, job.seed, job.repeat, { out: job.out, at: 0, from: 0, to: job.ids.length });
      port.postMessage({ id: job.id });
    }
  } catch (e) {
    port.postMessage({ id: job.id, error: String((e as Error).stack ?? e) });
  }
  // A Parquet share that failed before touching its memory must not leave the main thread waiting.
  if (job.kind === 'parquet' && Atomics.load(job.ready, 0) === 0) {
    Atomics.store(job.ready, 0, 1);
    Atomics.notify(job.ready, 0);
  }
  Atomics.store(job.done, 0, 1);
  Atomics.notify(job.done, 0);
}
