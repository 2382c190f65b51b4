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

export function formatProblemsJson(problems: readonly Problem[]): string {
  return JSON.stringify(
    problems.map((p) => ({
      code: p.code,
      severity: p.severity,
      message: p.message,
      file: p.file ?? null,
      line: p.position?.line ?? null,
      col: p.position?.col ?? null,
      path: p.path ?? null,
      hint: p.hint ?? null,
    })),
    null,
    2,
  );
}

export function countSummary(problems: readonly Problem[]): string {
  const errors = problems.filter((p) => p.severity === 'error').length;
  const warnings = problems.length - errors;
  const plural = (n: number, w: string) => `${n} ${w}${n === 1 ? '' : 's'}`;
  return `${plural(errors, 'error')}, ${plural(warnings, 'warning')}`;
}
