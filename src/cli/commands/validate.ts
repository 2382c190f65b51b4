import { hasErrors, type Problem } from '../../problems/problem.js';
import { validateProtocol } from '../../io/validate.js';
import { protocolPolicy } from '../../io/path-policy.js';
import type { CommandIo, ExitCode } from '../io.js';
import { countSummary, reportProblems, type OutputFormat } from '../report-problems.js';

export interface ValidateArgs {
  protocols: string[];
  format: OutputFormat;
  allowOutside?: boolean;
}

export async function validateCommand(args: ValidateArgs, io: CommandIo): Promise<ExitCode> {
  const all: Problem[] = [];
  let unreadable = false;
  const verdicts: string[] = [];
  for (const path of args.protocols) {
    const report = await validateProtocol(path, { access: protocolPolicy(path, Boolean(args.allowOutside)) });
    all.push(...report.problems);
    unreadable ||= Boolean(report.unreadable);
    verdicts.push(`${report.file}: ${hasErrors(report.problems) ? 'invalid' : 'valid'} (${countSummary(report.problems)})`);
  }
  reportProblems(io, all, args.format);
  if (args.format === 'text') io.err(verdicts.join('\n') + '\n');
  if (unreadable) return 2;
  return hasErrors(all) ? 1 : 0;
}
