#!/usr/bin/env node
'use strict';
// foldseal's command line. It runs the program that the build bundled into one file
// (dist/bin/cli.js, made by scripts/bundle.mjs), with the V8 code cache the build made of it while
// it ran a protocol (dist/bin/cli.v8cache): a run then neither resolves some 160 modules nor
// compiles the functions it calls. V8 takes a cache only under the flags it was made with and from
// its own version; otherwise it compiles as usual, to the same program. Without the bundle (a
// build by tsc alone) the modules of dist/src run instead.
const { closeSync, existsSync, openSync, readFileSync, readSync, statSync } = require('node:fs');
const Module = require('node:module');
const { dirname, isAbsolute, join, resolve } = require('node:path');
const { setFlagsFromString } = require('node:v8');
const { Script } = require('node:vm');

const dir = join(__dirname, '..', 'dist', 'bin');
const file = join(dir, 'cli.js');

/**
 * Compiles the bundle (with `cachedData` when given), runs it as a CommonJS module and returns
 * the script (the build asks it for a cache once the run is over).
 */
function start(cachedData) {
  // Node 20 gives a script compiled here no import() of its own (without an experimental flag):
  // src/io/import-package.ts uses this one for the ES-module packages `report` loads.
  globalThis[Symbol.for('foldseal.importPackage')] = (name) => import(name);
  // What the build wrote of the program's settings (scripts/bundle.mjs): the flags it sets first
  // thing (src/io/heap-flags.ts), set before compiling, and the sizes a table is read on two threads from.
  const launch = JSON.parse(readFileSync(join(dir, 'launch.json'), 'utf8'));
  setFlagsFromString(launch.v8Flags);
  prestartRowThread(launch);
  const script = new Script(Module.wrap(readFileSync(file, 'utf8')), {
    filename: file,
    cachedData,
  });
  const module = new Module(file, null);
  module.filename = file;
  module.paths = Module._nodeModulePaths(dir);
  script.runInThisContext()(module.exports, Module.createRequire(file), module, file, dir);
  return script;
}

/**
 * `run` reads a large table on two threads, and a worker takes 60–100 ms to start: for a protocol
 * that names a large enough file, the second thread starts here, before the program loads, and
 * src/io/row-helper.ts takes it over (or closes it when the run wants none). A guess from the
 * protocol's text that costs a thread's start-up when wrong, never a result: nothing but the
 * sizes of files in the protocol's own folder is looked at, and the program reads what it reads
 * after its own checks. Not for another command, a shard, or one thread (FOLDSEAL_THREADS=1).
 */
function prestartRowThread(launch) {
  const args = process.argv.slice(2);
  if (args[0] !== 'run' || !args[1] || args[1].startsWith('-') || args.some((a) => a.startsWith('--shard'))) return;
  const threads = process.env.FOLDSEAL_THREADS;
  if (threads === '1' || require('node:os').availableParallelism() < 2) return;
  if (!(Number(threads) >= 2 || namesLargeFile(args[1], launch))) return;
  const { MessageChannel, Worker } = require('node:worker_threads');
  const { port1, port2 } = new MessageChannel();
  const worker = new Worker(join(dir, 'row-worker.js'), {
    workerData: { port: port2, parquet: false, heapFlags: launch.v8Flags },
    transferList: [port2],
  });
  // It does not keep the process alive until the program takes it.
  worker.unref();
  globalThis[Symbol.for('foldseal.rowThread')] = { worker, port: port1 };
}

/** Whether the protocol's first 64 KB name (`file: NAME`) a file in its folder that two threads would read. */
function namesLargeFile(protocol, launch) {
  try {
    const fd = openSync(protocol, 'r');
    const head = Buffer.alloc(1 << 16);
    let text;
    try {
      text = head.toString('utf8', 0, readSync(fd, head, 0, head.length, 0));
    } finally {
      closeSync(fd);
    }
    const folder = dirname(resolve(protocol));
    for (const [, name] of text.matchAll(/\bfile:\s*["']?([^"'\s,}#]+)/g)) {
      if (isAbsolute(name) || name.split(/[\\/]/).includes('..')) continue;
      const size = statSync(join(folder, name)).size;
      if (size >= (/\.parquet$/i.test(name) ? launch.twoThreadParquetBytes : launch.twoThreadBytes)) return true;
    }
  } catch {
    // No such file, or not readable: the program reports it.
  }
  return false;
}

if (require.main === module) {
  const cache = join(dir, 'cli.v8cache');
  if (existsSync(file)) start(existsSync(cache) ? readFileSync(cache) : undefined);
  else import('../dist/src/cli/main.js');
}

module.exports = { start, file, namesLargeFile };
