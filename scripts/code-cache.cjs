'use strict';
// Build step (scripts/bundle.mjs): runs the bundled command line with the arguments after the
// cache's path, as bin/foldseal.cjs does, and writes V8's code cache of it once the run is over (the
// cache then holds every function the run compiled).
const { writeFileSync } = require('node:fs');
const { start, file } = require('../bin/foldseal.cjs');

const [cachePath, ...args] = process.argv.slice(2);
process.argv = [process.argv[0], file, ...args];
const script = start(undefined);
process.on('exit', () => writeFileSync(cachePath, script.createCachedData()));
