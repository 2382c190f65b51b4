#!/usr/bin/env node
'use strict';
// foldseal's command line. It runs the program that the build bundled into one file
// (dist/bin/cli.js, made by scripts/bundle.mjs), with the V8 code cache the build made of it while
// it ran a protocol (dist/bin/cli.v8cache): a run then neither resolves some 160 modules nor
// compiles the functions it calls. V8 takes a cache only under the flags it was made with and from
// its own version; otherwise it compiles as usual, to the same program. Without the bundle (a
// build by tsc alone) the modules of dist/src run instead.
const { existsSync, readFileSync } = require('node:fs');
const Module = require('node:module');
const { join } = require('node:path');
const { setFlagsFromString } = require('node:v8');
const { Script } = require('node:vm');

const dir = join(__dirname, '..', 'dist', 'bin');
const file = join(dir, 'cli.js');

function readIfThere(path) {
  try {
    return readFileSync(path);
  } catch {
    return undefined;
  }
}

/**
 * Compiles the bundle (with `cachedData` when given), runs it as a CommonJS module and returns
 * the script (the build asks it for a cache once the run is over).
 */
function start(cachedData) {
  // Node 20 gives a script compiled here no import() of its own (without an experimental flag):
  // src/io/import-package.ts uses this one for the ES-module packages `report` loads.
  globalThis[Symbol.for('foldseal.importPackage')] = (name) => import(name);
  // The flags the program sets first thing (src/io/heap-flags.ts), set before compiling.
  const flags = readIfThere(join(dir, 'cli.v8flags'));
  if (flags) setFlagsFromString(flags.toString('utf8'));
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

if (require.main === module) {
  if (existsSync(file)) start(readIfThere(join(dir, 'cli.v8cache')));
  else import('../dist/src/cli/main.js');
}

module.exports = { start, file };
