/**
 * The imperative shell around validation: reads the protocol, its data, its pinned
 * file and new rows, hashes them, and hands everything to the pure checks.
 */
import { open, stat } from 'node:fs/promises';
import { dirname, relative, resolve } from 'node:path';
import { error, hasErrors, type Problem } from '../problems/problem.js';
import { locate } from '../protocol/document.js';
import { parseProtocol, PROTOCOL_SCHEMA, type ParsedProtocol } from '../protocol/parse.js';
import type { ValidationReport } from '../protocol/report.js';
import { schemaValidator } from './schemas.js';
import { checkAgainstData } from '../protocol/semantic.js';
import { isPinned, type Protocol, type RuleSplit } from '../protocol/types.js';
import { splitRules } from '../split/registry.js';
import { delimiterFor, tableFromBytes, tableFromLayout, type SheetInput } from '../table/load.js';
import { readStreamed } from './streamed-read.js';
import { tableContent } from './table-content.js';
import type { ColumnTable } from '../table/columns.js';
import { knownColumns } from '../protocol/known-columns.js';
import { newRowsFromBytes, type NewRows } from '../table/new-rows.js';
import { fileProblem, readBytes, readRegularText } from './files.js';
import { knownIdProblems, knownRows } from '../reconcile/known-ids.js';
import { outsideProblem, protocolPolicy, type PathPolicy } from './path-policy.js';
import { rowThreadsAvailable, startRowThread, type RowThread } from './row-helper.js';
import { collectGarbage } from './heap-flags.js';
import { takeEarlyRowThread } from './early-row-thread.js';

export type { ValidationReport } from '../protocol/report.js';

/** Path as shown in messages: relative to the working folder when that is shorter. */
export function shown(path: string): string {
  const rel = relative(process.cwd(), path);
  return rel && !rel.startsWith('..') ? rel : path;
}

/** Plain tables from this size on are read in stretches, never held whole (a fresh megabyte costs about 3 ms to touch here). */
export const STREAMED_READ_BYTES = 1 << 20;

/** The largest protocol file foldseal reads (a protocol is a page of YAML; anything larger is refused before parsing). */
export const PROTOCOL_MAX_BYTES = 1 << 20;

/** The file name endings of protocols: `run` accepts exactly what the repository gate looks at. */
export const PROTOCOL_EXTENSION = /\.(ya?ml|json)$/i;

export async function loadProtocol(path: string): Promise<ValidationReport> {
  const file = shown(resolve(path));
  if (!PROTOCOL_EXTENSION.test(path)) {
    return {
      file,
      problems: [
        error('protocol-extension', `${file} does not end in .yaml, .yml or .json`, {
          file,
          hint: 'rename it: the repository gate looks for protocols by these endings, and a protocol it cannot see cannot be checked',
        }),
      ],
      unreadable: true,
    };
  }
  let text: string;
  try {
    text = await readRegularText(path, PROTOCOL_MAX_BYTES);
  } catch (e) {
    return { file, problems: [fileProblem(e as NodeJS.ErrnoException, file, { file })], unreadable: true };
  }
  return parseProtocol(text, file, schemaValidator(PROTOCOL_SCHEMA));
}

export interface ValidateOptions {
  /** Read the data from here instead of the protocol's data.file (the hash must still match). */
  dataOverride?: string;
  /** Where the files the protocol names may lie (default: protocolPolicy of the protocol's path). */
  access?: PathPolicy;
  /** Also describe the columns that are not features (covariates, cell positions): for the leakage audit. */
  describe?: boolean;
  /**
   * Offered the second thread that helps read the data, if one does: true takes it over instead
   * of it being stopped after the read (run fits folds on it; it loads that code while the file
   * is read), and the taker closes it.
   */
  keepThread?: (thread: RowThread, p: Protocol, size: number) => boolean;
}

export async function validateProtocol(path: string, options: ValidateOptions = {}): Promise<ValidationReport> {
  const parsed = await loadProtocol(path);
  if (!parsed.protocol || !parsed.source) return parsed;
  const p = parsed.protocol;
  const source = parsed.source;
  const base = dirname(resolve(path));
  const at = (docPath: (string | number)[]) => ({ file: parsed.file, path: docPath, position: locate(source, docPath) });
  const paths = {
    data: options.dataOverride ? resolve(options.dataOverride) : resolve(base, p.data.file),
    samples: p.data.samples ? resolve(base, p.data.samples.file) : undefined,
    pinned: isPinned(p.split) ? resolve(base, p.split.pinned.file) : undefined,
    newRows: p.reconcile.newRows ? resolve(base, p.reconcile.newRows.file) : undefined,
  };
  const access = options.access ?? protocolPolicy(path);
  const outside = [
    options.dataOverride ? undefined : outsideProblem(paths.data, access, p.data.file, 'data file', at(['data', 'file'])),
    paths.samples
      ? outsideProblem(paths.samples, access, p.data.samples!.file, 'sample sheet', at(['data', 'samples', 'file']))
      : undefined,
    paths.pinned
      ? outsideProblem(
          paths.pinned,
          access,
          (p.split as { pinned: { file: string } }).pinned.file,
          'pinned assignment file',
          at(['split', 'pinned', 'file']),
        )
      : undefined,
    paths.newRows
      ? outsideProblem(paths.newRows, access, p.reconcile.newRows!.file, 'new-rows file', at(['reconcile', 'new-rows', 'file']))
      : undefined,
    ...(p.model.command?.files ?? []).map((f, i) =>
      outsideProblem(resolve(base, f.file), access, f.file, "model's file", at(['model', 'command', 'files', i, 'file'])),
    ),
  ].filter((q): q is Problem => q !== undefined);
  if (outside.length) return { ...parsed, problems: [...parsed.problems, ...outside], paths };
  // A command model's files are hashed like the data before anything runs (the run checks them again after).
  if (p.model.kind === 'command' && p.model.command)
    parsed.problems.push(...(await (await import('./command-model.js')).commandFileProblems(p.model.command, base, at)));
  // A large data file is parsed on two threads: start the second while the file is read.
  const size = await stat(paths.data).then(
    (st) => st.size,
    () => 0,
  );
  const parquet = size > 0 && (await startsLikeParquet(paths.data));
  // `run` may have started it already, for this file (early-row-thread.ts).
  const early = await takeEarlyRowThread(paths.data, parquet);
  const rowThread = rowThreadsAvailable(size, parquet) ? (early ?? startRowThread({ parquet })) : undefined;
  if (!rowThread) await early?.close();
  // A thread kept for the folds loads their code now, while this one reads the file.
  const kept = rowThread !== undefined && options.keepThread?.(rowThread, p, size) === true;
  if (kept) rowThread.prepareFolds();
  let released = false;
  const release = async () => {
    if (kept || released) return;
    released = true;
    await rowThread?.close();
  };
  try {
    return await validateWithData({ ...parsed, protocol: p, source }, paths, at, rowThread, Boolean(options.describe), size, release);
  } finally {
    await release();
  }
}

/** Does the file begin with Parquet's magic bytes? (The row thread then loads its decoder early.) */
async function startsLikeParquet(path: string): Promise<boolean> {
  const handle = await open(path).catch(() => undefined);
  if (!handle) return false;
  // A folder or an unreadable file is reported by the read that follows; here it is just not Parquet.
  const read = await handle.read(Buffer.alloc(4), 0, 4, 0).catch(() => undefined);
  await handle.close();
  return read?.bytesRead === 4 && read.buffer.toString('latin1') === 'PAR1';
}

async function validateWithData(
  parsed: ParsedProtocol & { protocol: Protocol; source: NonNullable<ParsedProtocol['source']> },
  paths: { data: string; samples?: string; pinned?: string; newRows?: string },
  at: (docPath: (string | number)[]) => Partial<Problem>,
  rowThread: RowThread | undefined,
  describe: boolean,
  size: number,
  /** Lets the row thread go (when the folds do not keep it), once the table and its split keys are made. */
  release: () => Promise<void>,
): Promise<ValidationReport> {
  const p = parsed.protocol;
  const source = parsed.source;
  const problems: Problem[] = [...parsed.problems];
  const roleLocate = (role: 'id' | 'label' | 'group' | 'features', index?: number) =>
    locate(
      source,
      index === undefined ? ['data', role] : ['data', 'features', ...(Array.isArray(p.data.features) ? [] : ['exclude']), index],
    );
  // A large plain table is read in stretches (on two threads when it is larger still), never
  // whole (undefined: not such a table, read whole below).
  const streamed =
    (rowThread || size >= STREAMED_READ_BYTES) && p.data.layout === 'samples-in-rows' && !p.data.samples && !p.data.where && !p.data.classes
      ? readStreamed(
          paths.data,
          shown(paths.data),
          delimiterFor(shown(paths.data), p.data.format),
          { ...dataRoles(p), keepOtherColumns: describe },
          roleLocate,
          rowThread,
          () => {
            if (rowThread && hashesIds(p.split) && p.data.id !== undefined)
              rowThread.expectKeys({ idColumn: p.data.id, seed: p.split.seed ?? 0, repeats: p.split.repeats });
          },
        )
      : undefined;
  const data = streamed
    ? { sha256: streamed.sha256, bytes: undefined, problem: undefined }
    : await readBytes(
        paths.data,
        shown(paths.data),
        at(['data', 'file']),
        rowThread ? { shared: true, hash: (bytes) => rowThread.sha256(bytes) } : {},
      );
  let pinned: { bytes: Uint8Array; sha256: string; shownAs: string } | undefined;
  if (paths.pinned) {
    const pin = await readBytes(paths.pinned, shown(paths.pinned), at(['split', 'pinned', 'file']));
    if (pin.problem) problems.push(pin.problem);
    else pinned = { bytes: pin.bytes!, sha256: pin.sha256!, shownAs: shown(paths.pinned) };
  }
  let newRowBytes: Uint8Array | ColumnTable | undefined;
  if (paths.newRows && p.reconcile.newRows) {
    const nr = await readBytes(paths.newRows, shown(paths.newRows), at(['reconcile', 'new-rows', 'file']));
    if (nr.problem) problems.push(nr.problem);
    else if (nr.sha256 !== p.reconcile.newRows.sha256) {
      problems.push(
        error(
          'new-rows-hash-mismatch',
          `the new-rows file's SHA-256 is ${nr.sha256}, not the ${p.reconcile.newRows.sha256} this protocol records`,
          at(['reconcile', 'new-rows', 'sha256']),
        ),
      );
    } else {
      const plain = await tableContent(nr.bytes!, shown(paths.newRows), at(['reconcile', 'new-rows', 'file']));
      if (plain.problem) problems.push(plain.problem);
      else newRowBytes = plain.content;
    }
  }
  if (data.problem) {
    problems.push(data.problem);
    return { ...parsed, problems, paths };
  }
  // The declared hashes are of the bytes on disk; a gzip file is then read as its text.
  // A streamed table is built already: no content is read again (the empty bytes are never parsed).
  const text = streamed
    ? { content: new Uint8Array(0), problem: undefined }
    : await tableContent(data.bytes!, shown(paths.data), at(['data', 'file']), rowThread);
  let sheet: SheetInput | undefined;
  if (paths.samples && p.data.samples) {
    const raw = await readBytes(paths.samples, shown(paths.samples), at(['data', 'samples', 'file']));
    const plain = raw.problem ? undefined : await tableContent(raw.bytes!, shown(paths.samples), at(['data', 'samples', 'file']));
    if (raw.problem) problems.push(raw.problem);
    else if (plain?.problem) problems.push(plain.problem);
    else if (raw.sha256 !== p.data.samples.sha256)
      problems.push(
        error(
          'samples-hash-mismatch',
          `the sample sheet's SHA-256 is ${raw.sha256}, not the ${p.data.samples.sha256} this protocol records`,
          at(['data', 'samples', 'sha256']),
        ),
      );
    else
      sheet = {
        bytes: plain!.content!,
        file: shown(paths.samples),
        format: p.data.samples.format,
        unmatched: p.data.samples.unmatched,
        at: at(['data', 'samples']),
      };
  }
  if (text.problem || (p.data.samples && !sheet)) {
    if (text.problem) problems.push(text.problem);
    return { ...parsed, problems, paths };
  }
  // The second thread parses half of a plain, uncompressed samples-in-rows file; other files are read here.
  const simple =
    !streamed && text.content === data.bytes && p.data.layout === 'samples-in-rows' && !sheet && !p.data.where && !p.data.classes;
  const helper = simple ? rowThread : undefined;
  if (helper && hashesIds(p.split) && p.data.id !== undefined)
    helper.expectKeys({ idColumn: p.data.id, seed: p.split.seed ?? 0, repeats: p.split.repeats });
  // A decoded columnar file's ids are known already: the other thread derives half of their keys
  // while this one builds the table.
  const decoded = text.content instanceof Uint8Array ? undefined : text.content;
  const ids = decoded && p.data.id !== undefined ? decoded.columns[decoded.names.indexOf(p.data.id)] : undefined;
  if (rowThread && Array.isArray(ids) && ids.length >= 10_000 && hashesIds(p.split) && p.data.layout === 'samples-in-rows' && !sheet)
    rowThread.keysAhead(ids, p.split.seed ?? 0, p.split.repeats);
  const built: ReturnType<typeof tableFromLayout> = streamed
    ? streamed.built
    : simple
      ? tableFromBytes(data.bytes!, shown(paths.data), { ...dataRoles(p), keepOtherColumns: describe }, p.data.format, roleLocate, helper)
      : tableFromLayout(
          text.content,
          shown(paths.data),
          { ...dataRoles(p), keepOtherColumns: describe },
          p.data.format,
          p.data.layout,
          sheet,
          roleLocate,
          (column) => at(['data', 'where', column]),
        );
  // A file that is not the recorded one is reported as that alone: its structural problems would
  // only distract. (The hash is taken while the file is parsed, on the second thread for large files.)
  if (data.sha256 !== p.data.sha256) {
    problems.push(
      error('data-hash-mismatch', `the data file's SHA-256 is ${data.sha256}, not the ${p.data.sha256} this protocol records`, {
        ...at(['data', 'sha256']),
        hint: 'if the data changed on purpose, put the new hash here (`foldseal hash FILE`)',
      }),
    );
    return { ...parsed, problems, paths, dataSha256: data.sha256 };
  }
  problems.push(...built.problems.map((q) => (q.file ? q : { ...q, file: parsed.file })));
  if (!built.table || hasErrors(built.problems) || (paths.pinned && !pinned)) {
    return { ...parsed, problems, paths, table: built.table, dataSha256: data.sha256 };
  }
  const idKeys = rowThread && splitKeysOnTwoThreads(p, built.table.ids, rowThread);
  // The row thread's work here is done: its memory goes before the split's (on a million rows,
  // some 40 MB at the run's highest point).
  await release();
  collectGarbage(built.table.X.rows * built.table.X.cols);
  const semantic = checkAgainstData(p, source, { table: built.table, sha256: data.sha256!, pinned, idKeys });
  problems.push(...semantic.problems);
  let newRows: NewRows | undefined;
  if (newRowBytes) {
    const nr = newRowsFromBytes(
      newRowBytes,
      shown(paths.newRows!),
      built.table.featureNames,
      p.reconcile.newRows!.id ?? p.data.id,
      p.data.missing,
      {
        known: knownColumns(p),
        layout: p.reconcile.newRows!.layout,
        label: p.data.label,
      },
    );
    problems.push(...nr.problems);
    newRows = nr.rows;
    if (newRows) {
      const t = built.table;
      // Only the training rows whose id a new row also has need a digest.
      const rowOf = new Map(t.ids.map((id, r) => [id, r]));
      const shared = newRows.ids.flatMap((id) => (rowOf.has(id) ? [rowOf.get(id)!] : []));
      const digests = knownRows(t.ids, t.X, t.featureNames, shared);
      problems.push(
        ...knownIdProblems(newRows, shown(paths.newRows!), t.featureNames, new Map(Object.entries(digests)), (id) => ({
          where: `${shown(paths.data)} line ${t.rowLines[rowOf.get(id)!]}`,
        })),
      );
    }
  }
  return {
    ...parsed,
    problems,
    paths,
    table: built.table,
    dataSha256: data.sha256,
    joined: built.joined,
    filtered: built.filtered,
    described: built.described,
    newRows,
    assignment: hasErrors(problems) ? undefined : semantic.assignment,
  };
}

/** A rule split whose keys are of ids (see SplitRuleImpl.keysIds). */
function hashesIds(split: Protocol['split']): split is RuleSplit {
  return !isPinned(split) && splitRules[split.rule].keysIds === true;
}

/** Many ids: derive every repeat's split keys with the row thread's help (rules that hash group names derive their own). */
function splitKeysOnTwoThreads(
  p: Protocol,
  ids: readonly string[],
  rowThread: RowThread,
): ((seed: number, repeat: number) => Uint8Array | undefined) | undefined {
  if (!hashesIds(p.split) || ids.length < 10_000) return undefined;
  const seed = p.split.seed ?? 0;
  const keys = Array.from({ length: p.split.repeats }, (_, r) => rowThread.keys(ids, seed, r + 1));
  return (s, repeat) => (s === seed ? keys[repeat - 1] : undefined);
}

export function dataRoles(p: Protocol) {
  return {
    id: p.data.id,
    label: p.data.label,
    group: p.data.group,
    features: p.data.features,
    missing: p.data.missing,
    where: p.data.where,
    classes: p.data.classes,
  };
}
