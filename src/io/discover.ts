/**
 * Finds protocol files under a folder the way `run` reads them: any .yaml, .yml or .json file
 * (1 MiB at most, the protocol size limit) whose parsed top level has the key `foldseal`, however
 * it is spelled (a BOM, quoted or escaped keys, flow or JSON style, explicit keys). A file that
 * does not parse is listed when its text mentions foldseal, so the gate reports its syntax error.
 * Skips node_modules, dot-folders and the policy's `skip` folders unless the policy's `include`
 * names them; never follows symlinked folders, so loops cannot hang it.
 */
import { lstat, readdir, realpath } from 'node:fs/promises';
import { join, relative } from 'node:path';
import { parseYaml } from '../protocol/document.js';
import { readRegularText } from './files.js';
import { PROTOCOL_EXTENSION, PROTOCOL_MAX_BYTES } from './validate.js';

export interface Discovered {
  /** Protocol paths relative to the root, forward slashes, sorted. */
  found: string[];
  /** Folders not looked into (relative, forward slashes), for the summary line. */
  skipped: string[];
}

export interface FolderRules {
  skip?: readonly string[];
  include?: readonly string[];
}

/** Whether the gate looks into a folder at `rel` (relative to the checked root, forward slashes). */
export function folderSkipped(rel: string, rules: FolderRules = {}): boolean {
  const norm = (p: string) => p.replace(/^\.\/+/, '').replace(/\/+$/, '');
  const included = (rules.include ?? []).map(norm);
  if (included.some((inc) => inc === rel || inc.startsWith(rel + '/') || rel.startsWith(inc + '/'))) return false;
  const name = rel.split('/').pop()!;
  if (name === 'node_modules' || name.startsWith('.')) return true;
  return (rules.skip ?? []).map(norm).some((s) => rel === s || rel.startsWith(s + '/'));
}

/** Whether any folder on the way from the root to `relFile` is skipped. */
export function pathSkipped(relFile: string, rules: FolderRules = {}): boolean {
  const parts = relFile.split('/').slice(0, -1);
  for (let i = 1; i <= parts.length; i++) if (folderSkipped(parts.slice(0, i).join('/'), rules)) return true;
  return false;
}

export async function discoverProtocols(root: string, rules: FolderRules = {}): Promise<Discovered> {
  const found: string[] = [];
  const skipped: string[] = [];
  const seen = new Set<string>();
  const rel = (path: string) => relative(root, path).split('\\').join('/');
  const walk = async (dir: string): Promise<void> => {
    const real = await realpath(dir);
    if (seen.has(real)) return;
    seen.add(real);
    const entries = (await readdir(dir, { withFileTypes: true })).sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
    for (const e of entries) {
      const path = join(dir, e.name);
      if (e.isDirectory()) {
        if (folderSkipped(rel(path), rules)) {
          if (e.name !== '.git') skipped.push(rel(path));
          continue;
        }
        await walk(path);
      } else if (PROTOCOL_EXTENSION.test(e.name) && (e.isFile() || e.isSymbolicLink())) {
        if (await isProtocol(path)) found.push(rel(path));
      }
    }
  };
  await walk(root);
  return { found, skipped };
}

async function isProtocol(path: string): Promise<boolean> {
  const st = await lstat(path).catch(() => undefined);
  if (
    st?.isSymbolicLink() &&
    !(await realpath(path).then(
      () => true,
      () => false,
    ))
  )
    return false;
  let text: string;
  try {
    text = await readRegularText(path, PROTOCOL_MAX_BYTES);
  } catch (e) {
    // An unreadable file with a protocol's ending is listed, so the gate reports why it cannot be read.
    return (e as NodeJS.ErrnoException).code === 'EACCES';
  }
  try {
    const parsed = parseYaml(text, path);
    if (parsed.problems.some((p) => p.severity === 'error')) return /foldseal/i.test(text);
    const v = parsed.value;
    return v !== null && typeof v === 'object' && !Array.isArray(v) && Object.hasOwn(v, 'foldseal');
  } catch {
    return /foldseal/i.test(text);
  }
}
