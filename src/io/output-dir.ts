/**
 * Writes a results folder without ever losing anything:
 * - only a folder foldseal wrote (a manifest.json of ours, and nothing but the files it lists) is
 *   replaced, and only with --force; any other non-empty folder is refused, --force or not;
 * - the new folder is written to a hidden sibling, the old one is moved aside, the new one renamed
 *   in, then the old one deleted: a crash leaves the old or the new complete folder (or, for the
 *   instant between the two renames, the old one aside, which the next run puts back);
 * - one writer at a time per folder: a lock file beside it holds the writer's pid;
 * - the folder is checked when it is opened and again just before the swap (a run fits its folds
 *   in between).
 */
import { mkdir, mkdtemp, open, readdir, readFile, rename, rm, rmdir, lstat, unlink, writeFile } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { createHash } from 'node:crypto';
import { closeSync, fsyncSync, openSync, writeSync } from 'node:fs';
import { error, FoldsealError } from '../problems/problem.js';
import { REPORT_MARK } from '../report/mark.js';
import { writeProblem } from './output-file.js';

const NEW = '.foldseal-new-';
const OLD = '.foldseal-old-';
const LIST = 5;

/** What a manifest says about whose folder it is. */
type Listing = { 'foldseal-manifest'?: unknown; files?: unknown };

type FolderState = { kind: 'absent' | 'empty' | 'ours' } | { kind: 'foreign'; why: string };

/**
 * A results folder being written: files streamed in as they are made, the rest and the swap at
 * `commit`; `abort` leaves everything as it was. Exactly one of the two must be called (the
 * folder's lock is held until then).
 */
export interface OutputDir {
  /** Writes the file from its pieces as they come (synchronously), returning its SHA-256. */
  stream(name: string, pieces: Iterable<Uint8Array>): string;
  commit(files: Record<string, string | Uint8Array>): Promise<void>;
  abort(): Promise<void>;
}

/** Checks the folder may be written (see the top of this file), takes its lock, and starts the new folder beside it. */
export async function openOutputDir(dir: string, force: boolean, shownAs: string): Promise<OutputDir> {
  const parent = dirname(dir);
  const name = basename(dir);
  try {
    await mkdir(parent, { recursive: true });
  } catch (e) {
    throw new FoldsealError(writeProblem(e as NodeJS.ErrnoException, shown(parent, shownAs, dir)), 2);
  }
  const release = await takeLock(parent, name, shownAs);
  let state: FolderState;
  let temp: string;
  try {
    await recover(parent, name, dir);
    state = await folderState(dir);
    if (state.kind === 'foreign') throw foreignFolder(shownAs, state.why, force);
    if (state.kind === 'ours' && !force) {
      throw new FoldsealError(
        error('refuse-overwrite', `${shownAs} already exists`, {
          file: shownAs,
          hint: 'pass --force to replace it, or --out to choose another folder',
        }),
        2,
      );
    }
    try {
      temp = await mkdtemp(join(parent, `.${name}${NEW}`));
    } catch (e) {
      throw new FoldsealError(writeProblem(e as NodeJS.ErrnoException, shownAs), 2);
    }
  } catch (e) {
    await release();
    throw e;
  }
  // Once committed or aborted, the lock is no longer ours: a second abort does nothing.
  let closed = false;
  const abort = async () => {
    if (closed) return;
    closed = true;
    await rm(temp, { recursive: true, force: true });
    await release();
  };
  return {
    stream(file, pieces) {
      try {
        return streamDurably(join(temp, file), pieces);
      } catch (e) {
        throw new FoldsealError(writeProblem(e as NodeJS.ErrnoException, shownAs), 2);
      }
    },
    abort,
    async commit(files) {
      try {
        for (const [file, content] of Object.entries(files)) await writeDurably(join(temp, file), content);
        // The folds ran since the folder was checked: it is replaced only if it is still what it was
        // (a file put into a results folder meanwhile would go with it).
        const now = await folderState(dir);
        if (now.kind !== state.kind)
          throw foreignFolder(shownAs, `${now.kind === 'foreign' ? now.why : 'is not what it was'} (it changed while foldseal ran)`, force);
        if (state.kind === 'ours') {
          const aside = await mkdtemp(join(parent, `.${name}${OLD}`));
          await rename(dir, join(aside, 'previous'));
          await rename(temp, dir);
          await rm(aside, { recursive: true, force: true });
        } else {
          if (state.kind === 'empty') await rmdir(dir);
          await rename(temp, dir);
        }
      } catch (e) {
        await abort();
        if (e instanceof FoldsealError) throw e;
        throw new FoldsealError(writeProblem(e as NodeJS.ErrnoException, shownAs), 2);
      }
      closed = true;
      await release();
    },
  };
}

function foreignFolder(shownAs: string, why: string, force: boolean): FoldsealError {
  return new FoldsealError(
    error(
      'refuse-foreign-folder',
      `${shownAs} ${why}, so foldseal will not replace it${force ? ' (--force replaces only a results folder foldseal wrote)' : ''}`,
      { file: shownAs, hint: 'choose an empty or new folder with --out' },
    ),
    2,
  );
}

function shown(path: string, shownDir: string, dir: string): string {
  return path === dirname(dir) ? dirname(shownDir) || '.' : path;
}

/** A new file written piece by piece and synced, hashed as it goes. */
function streamDurably(path: string, pieces: Iterable<Uint8Array>): string {
  const fd = openSync(path, 'wx');
  try {
    const hash = createHash('sha256');
    for (const piece of pieces) {
      hash.update(piece);
      for (let done = 0; done < piece.length; ) done += writeSync(fd, piece, done, piece.length - done);
    }
    fsyncSync(fd);
    return hash.digest('hex');
  } finally {
    closeSync(fd);
  }
}

async function writeDurably(path: string, content: string | Uint8Array): Promise<void> {
  const file = await open(path, 'wx');
  try {
    await file.writeFile(content);
    await file.sync();
  } finally {
    await file.close();
  }
}

async function isOurReport(path: string): Promise<boolean> {
  const head = await readFile(path, 'utf8').then(
    (text) => text.slice(0, 512),
    () => '',
  );
  return head.includes(REPORT_MARK);
}

/**
 * The members of a manifest that say whose folder it is: its version and its files. A manifest
 * foldseal wrote is canonical JSON, its members in name order, so both come before "protocol"
 * and the assignment (a million-row run's 16 MB took 0.8 s to parse whole): the text up to
 * `,"protocol":` is parsed alone. (That sequence cannot occur inside a JSON string, whose quotes
 * are escaped.) Any other manifest, or a prefix without both members, is parsed whole.
 */
export function manifestListing(text: string): Listing | null {
  return listingFromHead(text) ?? JSON.parse(text);
}

/** The members before `"protocol"` when they hold the version and the files (the canonical layout), else undefined. */
function listingFromHead(text: string): Listing | undefined {
  const cut = text.indexOf(',"protocol":');
  if (cut <= 0) return undefined;
  try {
    const head = JSON.parse(`${text.slice(0, cut)}}`);
    if (head && typeof head === 'object' && 'foldseal-manifest' in head && 'files' in head) return head;
  } catch {
    // Not the canonical layout: parsed whole.
  }
  return undefined;
}

/**
 * manifestListing of the file, read only as far as its first 256 KB when the list is there (a
 * million-row manifest is not read whole, twice, to learn which files it lists).
 */
async function readManifestListing(path: string): Promise<Listing | null> {
  const handle = await open(path, 'r');
  let text: string;
  let whole: boolean;
  try {
    const head = Buffer.alloc(1 << 18);
    const { bytesRead } = await handle.read(head, 0, head.length, 0);
    whole = bytesRead < head.length;
    text = head.toString('utf8', 0, bytesRead);
  } finally {
    await handle.close();
  }
  if (whole) return manifestListing(text);
  return listingFromHead(text) ?? manifestListing(await readFile(path, 'utf8'));
}

/** What is at `dir` now: nothing, an empty folder, a results folder of ours, or something else. */
async function folderState(dir: string): Promise<FolderState> {
  let st: Awaited<ReturnType<typeof lstat>>;
  try {
    st = await lstat(dir);
  } catch {
    return { kind: 'absent' };
  }
  if (!st.isDirectory()) return { kind: 'foreign', why: st.isSymbolicLink() ? 'is a symbolic link' : 'exists and is not a folder' };
  const entries = (await readdir(dir, { withFileTypes: true })).map((e) => e.name).sort();
  if (entries.length === 0) return { kind: 'empty' };
  let listed: Set<string>;
  try {
    const manifest = await readManifestListing(join(dir, 'manifest.json'));
    if (!manifest || typeof manifest['foldseal-manifest'] !== 'number' || typeof manifest.files !== 'object' || manifest.files === null)
      throw new Error('not ours');
    listed = new Set(['manifest.json', 'manifest.json.sig', ...Object.keys(manifest.files)]);
    // report.html: the page `run --report` and `foldseal report` write next to the results, when it carries their mark.
    if (entries.includes('report.html') && (await isOurReport(join(dir, 'report.html')))) listed.add('report.html');
  } catch {
    return {
      kind: 'foreign',
      why:
        `is a folder with ${entries.length} entr${entries.length === 1 ? 'y' : 'ies'} ` +
        `(${entries.slice(0, LIST).join(', ')}${entries.length > LIST ? ', …' : ''}) and no foldseal manifest`,
    };
  }
  const extra: string[] = [];
  for (const e of entries) {
    const st = await lstat(join(dir, e));
    if (!listed.has(e) || !st.isFile()) extra.push(e);
  }
  if (extra.length)
    return {
      kind: 'foreign',
      why:
        `holds ${extra.length} entr${extra.length === 1 ? 'y' : 'ies'} foldseal did not write ` +
        `(${extra.slice(0, LIST).join(', ')}${extra.length > LIST ? ', …' : ''})`,
    };
  return { kind: 'ours' };
}

/**
 * Leftovers of runs that died: half-written new folders are deleted; an old folder moved aside is
 * put back if nothing took its place. Only what foldseal itself leaves is touched: a real folder
 * (not a link) holding nothing but plain files, or, set aside, nothing but `previous` holding
 * plain files. Anything else under such a name is the user's and stays.
 */
async function recover(parent: string, name: string, dir: string): Promise<void> {
  const entries = await readdir(parent).catch(() => [] as string[]);
  for (const e of entries.sort()) {
    const path = join(parent, e);
    if (e.startsWith(`.${name}${NEW}`)) {
      if (await onlyPlainFiles(path)) await rm(path, { recursive: true, force: true });
    } else if (e.startsWith(`.${name}${OLD}`)) {
      const inside = await realFolderEntries(path);
      if (!inside || inside.some((x) => x !== 'previous')) continue;
      const previous = join(path, 'previous');
      if (inside.length && !(await onlyPlainFiles(previous))) continue;
      const present = await lstat(dir).then(
        () => true,
        () => false,
      );
      if (inside.length && !present) await rename(previous, dir);
      await rm(path, { recursive: true, force: true });
    }
  }
}

/** The entries of a real folder (undefined for a file, a link or nothing). */
async function realFolderEntries(path: string): Promise<string[] | undefined> {
  const st = await lstat(path).catch(() => undefined);
  return st?.isDirectory() ? readdir(path) : undefined;
}

async function onlyPlainFiles(path: string): Promise<boolean> {
  const entries = await realFolderEntries(path);
  if (!entries) return false;
  for (const e of entries) if (!(await lstat(join(path, e))).isFile()) return false;
  return true;
}

/** A lock file `.NAME.foldseal-lock` holding the writer's pid; a lock whose process is gone is taken over. */
async function takeLock(parent: string, name: string, shownAs: string): Promise<() => Promise<void>> {
  const path = join(parent, `.${name}.foldseal-lock`);
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      await writeFile(path, `${process.pid}\n`, { flag: 'wx' });
      return () => unlink(path).catch(() => undefined);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw new FoldsealError(writeProblem(e as NodeJS.ErrnoException, shownAs), 2);
    }
    const owner = Number.parseInt(await readFile(path, 'utf8').catch(() => ''), 10);
    if (Number.isInteger(owner) && owner > 0 && alive(owner)) {
      throw new FoldsealError(
        error('output-busy', `another foldseal process (pid ${owner}) is writing ${shownAs}`, {
          file: shownAs,
          hint: `wait for it to finish; if no such process runs, delete ${join(dirname(shownAs), `.${name}.foldseal-lock`)}`,
        }),
        2,
      );
    }
    await unlink(path).catch(() => undefined);
  }
  /* c8 ignore next -- two processes took over the same stale lock at the same instant */
  throw new FoldsealError(error('output-busy', `another foldseal process is writing ${shownAs}`, { file: shownAs }), 2);
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}
