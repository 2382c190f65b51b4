import type { Problem } from './problem.js';

/** `PATH:LINE:COL: error: MESSAGE`, then an indented hint line when there is one. */
export function formatProblemText(p: Problem): string {
  const where = p.file ? (p.position ? `${p.file}:${p.position.line}:${p.position.col}: ` : `${p.file}: `) : '';
  const head = `${where}${p.severity}: ${p.message}`;
  return p.hint ? `${head}\n  hint: ${p.hint}` : head;
}

export function formatProblemsText(problems: readonly Problem[]): string {
  return problems.map(formatProblemText).join('\n');
}

/** Problems as plain JSON values: every field present, null where absent. */
export function problemsAsJson(problems: readonly Problem[]) {
  return problems.map((p) => ({
    code: p.code,
    severity: p.severity,
    message: p.message,
    file: p.file ?? null,
    line: p.position?.line ?? null,
    col: p.position?.col ?? null,
    path: p.path ?? null,
    hint: p.hint ?? null,
  }));
}

export function formatProblemsJson(problems: readonly Problem[]): string {
  return JSON.stringify(problemsAsJson(problems), null, 2);
}

export function countSummary(problems: readonly Problem[]): string {
  const count = (s: Problem['severity']) => problems.filter((p) => p.severity === s).length;
  const plural = (n: number, w: string) => `${n} ${w}${n === 1 ? '' : 's'}`;
  const notes = count('note');
  return `${plural(count('error'), 'error')}, ${plural(count('warning'), 'warning')}${notes ? `, ${plural(notes, 'note')}` : ''}`;
}
