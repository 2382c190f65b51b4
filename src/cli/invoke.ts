/** One invocation of the command line: arguments in, exit code out, every word through `io`. No process globals are touched. */
import { CommanderError } from 'commander';
import { FoldsealError } from '../problems/problem.js';
import type { CommandIo, ExitCode } from './io.js';
import { buildProgram } from './program.js';
import { reportProblems } from './report-problems.js';

export async function invoke(argv: string[], io: CommandIo): Promise<ExitCode> {
  let code: ExitCode = 0;
  const program = buildProgram(io, (c) => {
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
      reportProblems(io, e.problems, 'text');
      return e.exitCode;
    }
    const detail = e instanceof Error ? (e.stack ?? e.message) : String(e);
    io.err(`foldseal: internal error — this is a bug in foldseal, not in your input. Please report it with the text below.\n${detail}\n`);
    return 3;
  }
}
