#!/usr/bin/env node
/** The only place that reads argv and calls process.exit. */
import { processIo } from './io.js';
import { invoke } from './invoke.js';
import { CLI_HEAP_FLAGS, useHeapFlags } from '../io/heap-flags.js';

useHeapFlags(CLI_HEAP_FLAGS);

/** Resolves once everything written to the stream so far has been handed to the system (a pipe may drain slowly). */
function flushed(stream: NodeJS.WriteStream): Promise<void> {
  if (closed.has(stream) || stream.destroyed) return Promise.resolve();
  return new Promise((resolve) => stream.write('', () => resolve()));
}

// A reader that stops early (`foldseal folds P | head`) closes the pipe. The rest of the output has
// nowhere to go, which is not an error: the command still finishes its files and its exit code stands.
const closed = new Set<NodeJS.WriteStream>();
for (const stream of [process.stdout, process.stderr]) {
  stream.on('error', (e: NodeJS.ErrnoException) => {
    if (e.code !== 'EPIPE') throw e;
    closed.add(stream);
  });
}

// Exit only after stdout and stderr have drained: exiting at once cuts output to a slow pipe.
invoke(process.argv.slice(2), processIo).then(async (code) => {
  process.exitCode = code;
  await Promise.all([flushed(process.stdout), flushed(process.stderr)]);
  process.exit(code);
});
