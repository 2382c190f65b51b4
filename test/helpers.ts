/** Test fixtures: temporary folders with data and protocols, and a runner for the built binary. */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
export const bin = join(root, 'dist', 'src', 'cli', 'main.js');

export function sha256(text: string | Uint8Array): string {
  return createHash('sha256').update(text).digest('hex');
}

export function tempDir(files: Record<string, string | Uint8Array> = {}): string {
  const dir = mkdtempSync(join(tmpdir(), 'foldseal-test-'));
  for (const [name, content] of Object.entries(files)) {
    mkdirSync(dirname(join(dir, name)), { recursive: true });
    writeFileSync(join(dir, name), content);
  }
  return dir;
}

export interface CliResult {
  code: number | null;
  stdout: string;
  stderr: string;
}

export function cli(args: string[], cwd = root): CliResult {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1' } });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** A small valid table: ids, a binary label, three features, and a group column. */
export function smallCsv(rows = 20): string {
  const lines = ['id,label,g,a,b,c'];
  for (let i = 1; i <= rows; i++) lines.push(`r${i},${i % 2 ? 'x' : 'y'},G${i % 5},${i},${(i * 7) % 11},${(i * 3) % 5}.5`);
  return lines.join('\n') + '\n';
}

/** A protocol text for `data.csv` with the given body lines replacing the defaults. */
export function protocolText(csv: string, overrides: Partial<Record<'split' | 'model' | 'extra' | 'data', string>> = {}): string {
  return (
    [
      'foldseal: 1',
      'name: t',
      overrides.data ?? `data:\n  file: data.csv\n  sha256: "${sha256(csv)}"\n  id: id\n  label: label`,
      overrides.split ?? 'split:\n  rule: stratified-kfold\n  folds: 2\n  seed: 7',
      overrides.model ?? 'model: {kind: gaussian-nb}',
      overrides.extra ?? '',
    ].join('\n') + '\n'
  );
}

/** A table of test/reference/data/ as text and as cells (header, then rows): the open datasets the tests read. */
export function referenceTable(name: string): { csv: string; header: string[]; body: string[][] } {
  const csv = readFileSync(join(root, 'test', 'reference', 'data', name), 'utf8');
  const lines = csv
    .trimEnd()
    .split('\n')
    .map((l) => l.split(','));
  return { csv, header: lines[0], body: lines.slice(1) };
}
