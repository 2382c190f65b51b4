#!/usr/bin/env node
// Build step: the command line as one CommonJS file per thread in dist/bin/ (cli.js and the
// workers it starts), and V8's code cache of cli.js made while it runs the demo protocol, for
// bin/foldseal.cjs to load. One file spares a run the resolving and loading of some 160 modules
// (about 70 ms of a 1.2 s run of 100,000 rows); the cache spares it compiling what it calls.
// The chart libraries and the browser driver stay outside: only `report` loads them.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { buildSync } from 'esbuild';
import { CLI_HEAP_FLAGS } from '../dist/src/io/heap-flags.js';
import { SHARED_PARQUET_BYTES, SHARED_READ_BYTES } from '../dist/src/io/row-helper.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const out = join(root, 'dist', 'bin');
rmSync(out, { recursive: true, force: true });
buildSync({
  absWorkingDir: root,
  entryPoints: {
    cli: 'dist/src/cli/main.js',
    'row-worker': 'dist/src/io/row-worker.js',
    'fold-worker': 'dist/src/io/fold-worker.js',
    'permutation-worker': 'dist/src/io/permutation-worker.js',
  },
  outdir: out,
  bundle: true,
  format: 'cjs',
  platform: 'node',
  target: 'node20',
  external: ['vega', 'vega-lite', 'playwright-core'],
  // Workers are found beside the module that starts them, and the package root above it.
  define: { 'import.meta.url': '__foldsealModuleUrl' },
  banner: { js: "const __foldsealModuleUrl = require('node:url').pathToFileURL(__filename).href;" },
  sourcemap: 'linked',
  logLevel: 'warning',
});
writeFileSync(join(out, 'package.json'), '{ "type": "commonjs" }\n');
// The launcher wraps cli.js in a function, where a `#!` line is not allowed (the line stays, empty).
const cli = join(out, 'cli.js');
writeFileSync(cli, readFileSync(cli, 'utf8').replace(/^#!.*/, ''));
// What bin/foldseal.cjs needs of the program's settings before it loads it.
writeFileSync(
  join(out, 'launch.json'),
  `${JSON.stringify({ v8Flags: CLI_HEAP_FLAGS, twoThreadBytes: SHARED_READ_BYTES, twoThreadParquetBytes: SHARED_PARQUET_BYTES }, null, 2)}\n`,
);

// The code cache: the bundle run once on the demo protocol, to a scratch folder.
const scratch = mkdtempSync(join(tmpdir(), 'foldseal-bundle-'));
try {
  const made = spawnSync(
    process.execPath,
    [join(root, 'scripts', 'code-cache.cjs'), join(out, 'cli.v8cache'), 'run', join(root, 'protocols', 'demo.yaml'), '--out', scratch],
    { encoding: 'utf8' },
  );
  if (made.status !== 0) {
    process.stderr.write(made.stdout + made.stderr);
    throw new Error('bundle: the run that makes the code cache failed');
  }
} finally {
  rmSync(scratch, { recursive: true, force: true });
}
