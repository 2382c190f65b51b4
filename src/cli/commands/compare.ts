import { stat } from 'node:fs/promises';
import { basename, dirname, resolve } from 'node:path';
import { protocolPolicy } from '../../io/path-policy.js';
import { produceRun } from '../../io/produce-run.js';
import { readRecorded, readResults } from '../../io/results-dir.js';
import { shown } from '../../io/validate.js';
import { compareSides, pairingProblems } from '../../compare/paired.js';
import { sideFromResults, type ComparedSide } from '../../compare/side.js';
import { error, FoldsealError, hasErrors, type Problem } from '../../problems/problem.js';
import { compareText } from '../compare-table.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems, type OutputFormat } from '../report-problems.js';

export interface CompareArgs {
  a: string;
  b: string;
  level: string;
  metric?: string;
  format: OutputFormat;
  allowOutside?: boolean;
  /** Consent to run a command model's program when a side is a protocol. */
  allowCommands?: boolean;
}

/** A results folder (or its manifest.json) is read; anything else is a protocol, validated and run in memory. */
async function loadSide(path: string, args: CompareArgs, problems: Problem[]): Promise<ComparedSide | undefined> {
  const info = await stat(path).catch(() => undefined);
  const dir = info?.isDirectory() ? path : basename(path) === 'manifest.json' ? dirname(path) : undefined;
  if (dir !== undefined) {
    const results = await readResults(dir);
    return sideFromResults(shown(resolve(dir)), results, await readRecorded(dir, 'predictions.csv', results, 'predictions-hash-mismatch'));
  }
  const { report, out } = await produceRun(path, {
    access: protocolPolicy(path, Boolean(args.allowOutside)),
    withoutStatistics: true,
    allowCommands: args.allowCommands,
  });
  problems.push(...report.problems);
  if (report.unreadable) throw new FoldsealError(report.problems, 2);
  if (!out) return undefined;
  problems.push(...out.cv.warnings);
  // Run in memory without a sink: its predictions.csv is kept.
  return sideFromResults(shown(resolve(path)), out.results, out.predictions!);
}

export async function compareCommand(args: CompareArgs, io: CommandIo): Promise<ExitCode> {
  const level = Number(args.level);
  if (!(level > 0 && level < 1))
    throw new FoldsealError(error('bad-option', `--level must be a number between 0 and 1, not ${JSON.stringify(args.level)}`), 2);
  const problems: Problem[] = [];
  const a = await loadSide(args.a, args, problems);
  const b = await loadSide(args.b, args, problems);
  if (a && b) problems.push(...pairingProblems(a, b));
  if (a && b && args.metric !== undefined && !(a.metrics.includes(args.metric) && b.metrics.includes(args.metric)))
    problems.push(
      error('bad-option', `--metric ${args.metric} is not reported by both A and B`, {
        hint: `both report: ${a.metrics.filter((m) => b.metrics.includes(m)).join(', ')}`,
      }),
    );
  if (!a || !b || hasErrors(problems)) {
    if (args.format === 'json') io.out(JSON.stringify({ comparison: null, problems }, null, 2) + '\n');
    else reportProblems(io, problems, 'text');
    return 1;
  }
  const comparison = compareSides(a, b, { level, metric: args.metric });
  if (args.format === 'json') {
    io.out(JSON.stringify({ comparison, problems }, null, 2) + '\n');
    return 0;
  }
  reportProblems(io, problems, 'text');
  io.out(compareText(comparison));
  return 0;
}
