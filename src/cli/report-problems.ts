import { countSummary, formatProblemsJson, formatProblemsText, sortProblems, type Problem } from '../problems/index.js';
import type { CommandIo } from './io.js';

export type OutputFormat = 'text' | 'json';

/** Problems go to stderr as text, or to stdout as JSON (so `--format json` output can be piped). */
export function reportProblems(io: CommandIo, problems: readonly Problem[], format: OutputFormat): void {
  const sorted = sortProblems(problems);
  if (format === 'json') {
    io.out(formatProblemsJson(sorted) + '\n');
    return;
  }
  if (sorted.length) io.err(formatProblemsText(sorted) + '\n');
}

export { countSummary };
