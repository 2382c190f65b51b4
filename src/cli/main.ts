#!/usr/bin/env node
/** The only place that reads argv and calls process.exit. */
import { CommanderError } from 'commander';
import { FoldsealError } from '../problems/problem.js';
import { processIo, type ExitCode } from './io.js';
import { buildProgram } from './program.js';
import { reportProblems } from './report-problems.js';

export async function main(argv: string[]): Promise<ExitCode> {
  let code: ExitCode = 0;
  const program = buildProgram(processIo, (c) => { code = c; });
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
    const detail = e instanceof Error ? e.stack ?? e.message : String(e);
    processIo.err(`foldseal: internal error — this is a bug in foldseal, not in your input. Please report it with the text below.\n${detail}\n`);
    return 3;
  }
}

main(process.argv.slice(2)).then((code) => process.exit(code));
