/**
 * The protocol a manifest records, made ready to read its files again: `verify --rerun` runs it,
 * `apply` rebuilds the run's table from it (for fold models that reference their training rows).
 * Nothing is read before every path it names is known to lie inside the review folders.
 */
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import type { Problem } from '../problems/problem.js';
import { folderAbove, isInside, outsideProblem, protocolPolicy, realPath, trustedFolders, type PathPolicy } from './path-policy.js';

/**
 * Where a re-read may go: the review folder of the manifest — the git work tree it lies in, else
 * the working folder when it holds the manifest, else the manifest's own folder — and the folders
 * of the files the user named (--protocol, --data), and the trusted folders.
 */
export function reviewPolicy(manifestDir: string, args: { protocol?: string; data?: string; allowOutside?: boolean }): PathPolicy {
  const roots = [
    folderAbove(manifestDir, '.git') ?? (isInside(realPath(manifestDir), realPath(process.cwd())) ? process.cwd() : manifestDir),
  ];
  if (args.protocol) roots.push(...protocolPolicy(args.protocol).roots);
  if (args.data) roots.push(dirname(resolve(args.data)));
  return { roots: [...new Set([...roots, ...trustedFolders()])], allowOutside: Boolean(args.allowOutside) };
}

/**
 * Makes every file the protocol document names absolute (relative to `base`, its folder when it
 * ran), the data file `data` when given. Returns the paths that lie outside `access` as problems
 * located in `shownAs`, and changes nothing then.
 */
export function localizeProtocol(doc: any, base: string, access: PathPolicy, data: string | undefined, shownAs: string): Problem[] {
  const named: [string, string, string][] = [];
  if (!data) named.push([resolve(base, doc.data.file), doc.data.file, 'data file']);
  if (doc.data.samples) named.push([resolve(base, doc.data.samples.file), doc.data.samples.file, 'sample sheet']);
  if (doc.split?.pinned) named.push([resolve(base, doc.split.pinned.file), doc.split.pinned.file, 'pinned assignment file']);
  if (doc.reconcile?.['new-rows'])
    named.push([resolve(base, doc.reconcile['new-rows'].file), doc.reconcile['new-rows'].file, 'new-rows file']);
  for (const f of doc.model?.command?.files ?? []) named.push([resolve(base, f.file), f.file, "model's file"]);
  const outside = named
    .map(([path, as, what]) => outsideProblem(path, access, as, what, { file: shownAs }))
    .filter((q): q is Problem => q !== undefined);
  if (outside.length) return outside;
  doc.data.file = data ? resolve(data) : resolve(base, doc.data.file);
  if (doc.data.samples) doc.data.samples.file = resolve(base, doc.data.samples.file);
  if (doc.split?.pinned) doc.split.pinned.file = resolve(base, doc.split.pinned.file);
  if (doc.reconcile?.['new-rows']) doc.reconcile['new-rows'].file = resolve(base, doc.reconcile['new-rows'].file);
  for (const f of doc.model?.command?.files ?? []) f.file = resolve(base, f.file);
  return [];
}

/** `use` gets the path of the document written as a protocol file in a fresh temporary folder, deleted afterwards. */
export async function withProtocolCopy<T>(doc: unknown, use: (path: string) => Promise<T>): Promise<T> {
  const work = await mkdtemp(join(tmpdir(), 'foldseal-rerun-'));
  try {
    const path = join(work, 'protocol.yaml');
    await writeFile(path, JSON.stringify(doc, null, 2));
    return await use(path);
  } finally {
    await rm(work, { recursive: true, force: true });
  }
}
