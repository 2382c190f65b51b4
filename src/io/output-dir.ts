/** Writes a results folder atomically: everything goes to a sibling temp folder, renamed into place at the end. */
import { existsSync } from 'node:fs';
import { mkdir, mkdtemp, rename, rm, writeFile } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { error, FoldsealError } from '../problems/problem.js';

export async function writeOutputDir(dir: string, files: Record<string, string | Uint8Array>, force: boolean, shownAs: string): Promise<void> {
  if (existsSync(dir) && !force) {
    throw new FoldsealError(error('refuse-overwrite', `${shownAs} already exists`, { hint: 'pass --force to replace it, or --out to choose another folder' }), 2);
  }
  await mkdir(dirname(dir), { recursive: true });
  const temp = await mkdtemp(join(dirname(dir), `.${basename(dir)}.tmp-`));
  try {
    for (const [name, content] of Object.entries(files)) await writeFile(join(temp, name), content);
    if (existsSync(dir)) await rm(dir, { recursive: true, force: true });
    await rename(temp, dir);
  } catch (e) {
    await rm(temp, { recursive: true, force: true });
    throw e;
  }
}
