/** Test fixtures: temporary folders with data and protocols, and a runner for the built binary. */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import type { Test } from 'tap';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { invoke } from '../src/cli/invoke.js';

/** The package folder: the nearest folder above this file with a package.json (tests run from dist/test/). */
export const root = packageFolder(dirname(fileURLToPath(import.meta.url)));

function packageFolder(from: string): string {
  let dir = from;
  while (!existsSync(join(dir, 'package.json'))) {
    const up = dirname(dir);
    if (up === dir) throw new Error(`no package.json above ${from}`);
    dir = up;
  }
  return dir;
}
/**
 * The command line the tests spawn: the modules of dist/src, whose coverage maps back to src/.
 * FOLDSEAL_TEST_BIN names another entry (`npm run test:shipped` runs the spawning tests again
 * through the launcher users run, bin/foldseal.cjs, which loads the bundle of dist/bin).
 */
export const bin = process.env.FOLDSEAL_TEST_BIN
  ? resolve(root, process.env.FOLDSEAL_TEST_BIN)
  : join(root, 'dist', 'src', 'cli', 'main.js');

/** The launcher `npm install` puts on the PATH (package.json's bin). */
export const shipped = join(root, 'bin', 'foldseal.cjs');

export function sha256(text: string | Uint8Array): string {
  return createHash('sha256').update(text).digest('hex');
}

/** Folders tempDir made in this test process; removed when it exits, so runs do not pile up in the system's temporary folder. */
const made: string[] = [];
process.once('exit', () => {
  for (const dir of made) rmSync(dir, { recursive: true, force: true, maxRetries: 2 });
});

export function tempDir(files: Record<string, string | Uint8Array> = {}): string {
  const dir = mkdtempSync(join(tmpdir(), 'foldseal-test-'));
  made.push(dir);
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

/** The built binary in a child process: for what only a process shows (exit after flushing, signals, threads). */
export function spawnCli(args: string[], cwd = root, env: Record<string, string | undefined> = {}): CliResult {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1', ...env } });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

let queue: Promise<unknown> = Promise.resolve();

/**
 * The command line in this process: the same `invoke` the binary's entry calls, with the working
 * folder and environment set for the call and restored after it. Calls run one at a time (the
 * folder and environment are process-wide). A spawn costs ~0.4 s under the test runner; this, a few ms.
 */
export function cli(args: string[], cwd = root, env: Record<string, string | undefined> = {}): Promise<CliResult> {
  const task = queue.then(() => inProcess(args, cwd, env));
  queue = task.catch(() => undefined);
  return task;
}

async function inProcess(args: string[], cwd: string, env: Record<string, string | undefined>): Promise<CliResult> {
  const out: string[] = [];
  const err: string[] = [];
  const before = process.cwd();
  const saved = new Map<string, string | undefined>();
  for (const [k, v] of Object.entries({ NO_COLOR: '1', ...env })) {
    saved.set(k, process.env[k]);
    if (v === undefined) delete process.env[k];
    else process.env[k] = v;
  }
  process.chdir(cwd);
  try {
    const code = await invoke(args, { out: (t) => void out.push(t), err: (t) => void err.push(t), errIsTty: false });
    return { code, stdout: out.join(''), stderr: err.join('') };
  } finally {
    process.chdir(before);
    for (const [k, v] of saved) {
      if (v === undefined) delete process.env[k];
      else process.env[k] = v;
    }
  }
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

/**
 * Whether Debian's python3 has these packages (the live reference checks need them). Looked up on
 * disk: starting python3 and importing scikit-learn to find out costs a second or more per test file.
 */
export function debianPython(...modules: string[]): boolean {
  return existsSync('/usr/bin/python3') && modules.every((m) => existsSync(`/usr/lib/python3/dist-packages/${m}`));
}

/** Whether Debian's R has this package (r-cran-<name>), looked up on disk. */
export function debianR(pkg: string): boolean {
  return existsSync('/usr/bin/Rscript') && existsSync(`/usr/lib/R/site-library/${pkg}`);
}

/** `validate p.yaml` in a fresh folder of these files: the exit code, every expected stderr line, and nothing written. */
export function expectValidation(t: Test, name: string, files: Record<string, string>, expected: string[], code = 1): void {
  t.test(name, async (t) => {
    const dir = tempDir(files);
    const before = readdirSync(dir).sort();
    const r = await cli(['validate', 'p.yaml'], dir);
    t.equal(r.code, code, r.stderr);
    const lines = r.stderr.trimEnd().split('\n');
    for (const e of expected) t.ok(lines.includes(e), `has line: ${e}\n--- got:\n${r.stderr}`);
    t.same(readdirSync(dir).sort(), before, 'nothing is written');
  });
}
