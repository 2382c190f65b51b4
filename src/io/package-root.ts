/** The folder holding foldseal's package.json, found from this module's location (works from src/ and dist/src/). */
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

let cached: string | undefined;

export function packageRoot(): string {
  if (cached) return cached;
  let dir = dirname(fileURLToPath(import.meta.url));
  while (!existsSync(join(dir, 'package.json')) || !existsSync(join(dir, 'schema'))) {
    const up = dirname(dir);
    /* c8 ignore next -- only reached when the package is installed without its schema folder */
    if (up === dir) throw new Error('foldseal: package root not found');
    dir = up;
  }
  cached = dir;
  return dir;
}

export function packageVersion(): string {
  return (JSON.parse(readFileSync(join(packageRoot(), 'package.json'), 'utf8')) as { version: string }).version;
}
