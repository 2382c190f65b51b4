/** Finds protocol files under a folder: YAML files with a top-level `foldseal:` key. Skips node_modules and dot-folders; never follows symlinked folders, so loops cannot hang it. */
import { readdir, readFile, realpath } from 'node:fs/promises';
import { join, relative } from 'node:path';

const PROTOCOL_MARK = /^foldseal\s*:/m;

export async function discoverProtocols(root: string): Promise<string[]> {
  const found: string[] = [];
  const seen = new Set<string>();
  const walk = async (dir: string): Promise<void> => {
    const real = await realpath(dir);
    if (seen.has(real)) return;
    seen.add(real);
    const entries = (await readdir(dir, { withFileTypes: true })).sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
    for (const e of entries) {
      const path = join(dir, e.name);
      if (e.isDirectory()) {
        if (e.name === 'node_modules' || e.name.startsWith('.')) continue;
        await walk(path);
      } else if (/\.ya?ml$/i.test(e.name) && (e.isFile() || e.isSymbolicLink())) {
        // An unreadable file that looks like a protocol by name is still listed, so check reports it.
        const text = await readFile(path, 'utf8').catch((err: NodeJS.ErrnoException) => (err.code === 'EACCES' ? 'foldseal: unreadable' : ''));
        if (PROTOCOL_MARK.test(text)) found.push(relative(root, path).split('\\').join('/'));
      }
    }
  };
  await walk(root);
  return found;
}
