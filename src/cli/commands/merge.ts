import { protocolPolicy } from '../../io/path-policy.js';
import { fileProblem } from '../../io/files.js';
import { readPart, runIdentity, unitsOf } from '../../io/shard.js';
import { shown, validateProtocol } from '../../io/validate.js';
import { error, FoldsealError, hasErrors, type Problem } from '../../problems/problem.js';
import { mergeParts, type ShardPart } from '../../run/shards.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems } from '../report-problems.js';
import { runCommand, type RunArgs } from './run.js';

export interface MergeArgs extends Omit<RunArgs, 'shard'> {
  parts: string[];
}

/** The parts of a sharded run → the results folder `run` writes, byte for byte (apart from the manifest's time and signature). */
export async function mergeCommand(args: MergeArgs, io: CommandIo): Promise<ExitCode> {
  const report = await validateProtocol(args.protocol, {
    access: protocolPolicy(args.protocol, Boolean(args.allowOutside)),
    describe: true,
  });
  if (report.unreadable) throw new FoldsealError(report.problems, 2);
  if (hasErrors(report.problems) || !report.assignment) {
    reportProblems(io, report.problems, 'text');
    return 1;
  }
  const problems: Problem[] = [];
  const parts: { file: string; part: ShardPart }[] = [];
  for (const path of args.parts) {
    const file = shown(path);
    try {
      parts.push({ file, part: await readPart(path) });
    } catch (e) {
      problems.push(
        e instanceof SyntaxError
          ? error('shard-foreign', `${file} is not a shard part (not JSON: ${e.message})`, { file })
          : fileProblem(e as NodeJS.ErrnoException, file, { file }),
      );
    }
  }
  const { units } = unitsOf(report);
  const merged = problems.length ? undefined : mergeParts(parts, runIdentity(report), units);
  problems.push(...(merged?.problems ?? []));
  if (problems.length || !merged?.fits) {
    reportProblems(io, problems, 'text');
    io.err(`merge refused: nothing was written\n`);
    return 1;
  }
  io.err(`merging ${parts.length} parts: ${units.length} work units, each once\n`);
  return runCommand(args, io, { fits: merged.fits, permuted: merged.permuted, report });
}
