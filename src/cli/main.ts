#!/usr/bin/env node
/** The only place that reads argv and calls process.exit. */
import { processIo } from './io.js';
import { invoke } from './invoke.js';

/** Resolves once everything written to the stream so far has been handed to the system (a pipe may drain slowly). */
function flushed(stream: NodeJS.WriteStream): Promise<void> {
  return new Promise((resolve) => stream.write('', () => resolve()));
}

// Exit only after stdout and stderr have drained: exiting at once cuts output to a slow pipe.
invoke(process.argv.slice(2), processIo).then(async (code) => {
  process.exitCode = code;
  await Promise.all([flushed(process.stdout), flushed(process.stderr)]);
  process.exit(code);
});
