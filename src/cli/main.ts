#!/usr/bin/env node
/** The only place that reads argv and calls process.exit. */
import { CommanderError } from 'commander';
import { FoldsealError } from '../problems/problem.js';
import { processIo, type ExitCode } from './io.js';
import { buildProgram } from './program.js';
import { reportProblems } from './report-problems.js';

export async function main(argv: string[]): Promise<ExitCode> {
  let code: ExitCode = 0;
  const program = buildProgram(processIo, (c) => {
    code = c;
  });
  try {
    await program.parseAsync(argv, { from: 'user' });
    return code;
  } catch (e) {
    if (e instanceof CommanderError) {
      return e.exitCode === 0 || e.code === 'commander.helpDisplayed' || e.code === 'commander.version' ? 0 : 2;
    }
    if (e instanceof FoldsealError) {
      reportProblems(processIo, e.problems, 'text');
      return e.exitCode;
    }
    const detail = e instanceof Error ? (e.stack ?? e.message) : String(e);
    processIo.err(
      `foldseal: internal error — this is a bug in foldseal, not in your input. Please report it with the text below.\n${detail}\n`,
    );
    return 3;
  }
}

/** Resolves once everything written to the stream so far has been handed to the system (a pipe may drain slowly). */
function flushed(stream: NodeJS.WriteStream): Promise<void> {
  return new Promise((resolve) => stream.write('', () => resolve()));
}

// Exit only after stdout and stderr have drained: exiting at once cuts output to a slow pipe.
main(process.argv.slice(2)).then(async (code) => {
  process.exitCode = code;
  await Promise.all([flushed(process.stdout), flushed(process.stderr)]);
  process.exit(code);
});
