#!/usr/bin/env node
// `npm run test:shipped`: every compiled test that spawns the command line, run again with the
// launcher users run (bin/foldseal.cjs and the bundle it loads) in place of the modules of dist/src
// (test/helpers.ts: FOLDSEAL_TEST_BIN). Coverage is the main suite's, so it is off here.
import { spawnSync } from 'node:child_process';
import { readFileSync, readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const tests = join(root, 'dist', 'test');
// A test spawns the command line when it takes `bin` or `spawnCli` from the helpers.
const spawning = /import \{[^}]*\b(bin|spawnCli)\b[^}]*\} from '(\.\.\/)+helpers\.js'/;
const files = readdirSync(tests, { recursive: true, encoding: 'utf8' })
  .filter((f) => f.endsWith('.test.js') && !f.startsWith('external') && spawning.test(readFileSync(join(tests, f), 'utf8')))
  .sort()
  .map((f) => join('dist', 'test', f));
if (files.length === 0) throw new Error('test-shipped: no spawning test found');
const r = spawnSync(process.execPath, [join(root, 'node_modules', 'tap', 'dist', 'esm', 'run.mjs'), '--disable-coverage', ...files], {
  cwd: root,
  stdio: 'inherit',
  env: { ...process.env, FOLDSEAL_TEST_BIN: 'bin/foldseal.cjs' },
});
process.exit(r.status ?? 1);
