import { countSummary, formatProblemsJson, formatProblemsText, sortProblems, type Problem } from '../problems/index.js';
import type { CommandIo } from './io.js';

export type OutputFormat = 'text' | 'json';

/** Problems of one code shown in text before the rest are counted (`--all-problems` shows every one). */
export const SHOWN_PER_CODE = 50;

/** Codes that explain most of what follows them: shown first (a missing column or a wrong file makes later problems moot). */
const FIRST = [
  'file-missing',
  'file-unreadable',
  'file-not-regular',
  'data-not-a-table',
  'data-invalid-utf8',
  'data-hash-mismatch',
  'data-missing-column',
];

let showAll = false;

/** Set once from the global --all-problems option. */
export function showAllProblems(all: boolean): void {
  showAll = all;
}

/** Most useful first, then by file and position. */
export function orderProblems(problems: readonly Problem[]): Problem[] {
  const sorted = sortProblems(problems);
  const rank = (p: Problem) => {
    const i = FIRST.indexOf(p.code);
    return i < 0 ? FIRST.length : i;
  };
  return sorted
    .map((p, i) => [p, i] as const)
    .sort((a, b) => rank(a[0]) - rank(b[0]) || a[1] - b[1])
    .map(([p]) => p);
}

/** Problems go to stderr as text, or to stdout as JSON (so `--format json` output can be piped). */
export function reportProblems(io: CommandIo, problems: readonly Problem[], format: OutputFormat): void {
  const sorted = orderProblems(problems);
  if (format === 'json') {
    io.out(formatProblemsJson(sorted) + '\n');
    return;
  }
  if (!sorted.length) return;
  const perCode = new Map<string, number>();
  const shown: Problem[] = [];
  for (const p of sorted) {
    const n = (perCode.get(p.code) ?? 0) + 1;
    perCode.set(p.code, n);
    if (showAll || n <= SHOWN_PER_CODE) shown.push(p);
  }
  const hidden = [...perCode]
    .filter(([, n]) => !showAll && n > SHOWN_PER_CODE)
    .map(([code, n]) => `${n - SHOWN_PER_CODE} more ${code} problem${n - SHOWN_PER_CODE === 1 ? '' : 's'}`);
  io.err(formatProblemsText(shown) + '\n' + (hidden.length ? `… and ${hidden.join(', ')} not shown (--all-problems shows them)\n` : ''));
}

export { countSummary };
