/**
 * The one error model of foldseal. Every detector returns Problems as data;
 * only formatters (text, JSON) turn them into words on a screen.
 */
import { PROBLEM_CODES, type ProblemCode } from './codes.js';

export type { ProblemCode } from './codes.js';
/** error: the input cannot be used; warning: it can, but look at this; note: seen and reported, not a fault here. */
export type Severity = 'error' | 'warning' | 'note';

export interface Position {
  line: number; // 1-based
  col: number; // 1-based, in characters
}

export interface Problem {
  /** Stable machine code from the catalogue (codes.ts), e.g. `unknown-key`. */
  code: ProblemCode;
  severity: Severity;
  message: string;
  /** File the problem is in, as the user named it (or as resolved from the protocol). */
  file?: string;
  position?: Position;
  /** Path inside the protocol document, e.g. ["split", "folds"]. */
  path?: (string | number)[];
  hint?: string;
}

function withDefaultHint(code: ProblemCode, extra: Partial<Problem>): Partial<Problem> {
  const hint = (PROBLEM_CODES[code] as { hint?: string }).hint;
  return extra.hint === undefined && hint !== undefined ? { ...extra, hint } : extra;
}

export function error(code: ProblemCode, message: string, extra: Partial<Problem> = {}): Problem {
  return { code, severity: 'error', message, ...withDefaultHint(code, extra) };
}

export function warning(code: ProblemCode, message: string, extra: Partial<Problem> = {}): Problem {
  return { code, severity: 'warning', message, ...withDefaultHint(code, extra) };
}

/**
 * A fit or a transform that cannot be done on this data (not a bug): the one error class of the
 * fitting code. The shell turns it into a located problem.
 */
export class FitError extends Error {
  constructor(
    readonly code: ProblemCode,
    message: string,
    readonly hint?: string,
  ) {
    super(message);
    this.name = 'FitError';
  }
}

export function note(code: ProblemCode, message: string, extra: Partial<Problem> = {}): Problem {
  return { code, severity: 'note', message, ...withDefaultHint(code, extra) };
}

export function hasErrors(problems: readonly Problem[]): boolean {
  return problems.some((p) => p.severity === 'error');
}

/**
 * Thrown for user-facing failures that stop a command (usage, unreadable file,
 * refused overwrite). Carries Problems so the CLI formats them like any other.
 * `exitCode` 1 = the input is invalid, 2 = usage or unreadable input.
 */
export class FoldsealError extends Error {
  readonly problems: Problem[];
  readonly exitCode: 1 | 2;
  constructor(problems: Problem | Problem[], exitCode: 1 | 2 = 1) {
    const list = Array.isArray(problems) ? problems : [problems];
    super(list.map((p) => p.message).join('; '));
    this.name = 'FoldsealError';
    this.problems = list;
    this.exitCode = exitCode;
  }
}

/** Order problems by file, then position, then code, so output is stable. */
export function sortProblems(problems: readonly Problem[]): Problem[] {
  return [...problems].sort((a, b) => {
    const fa = a.file ?? '';
    const fb = b.file ?? '';
    if (fa !== fb) return fa < fb ? -1 : 1;
    const la = a.position?.line ?? 0;
    const lb = b.position?.line ?? 0;
    if (la !== lb) return la - lb;
    const ca = a.position?.col ?? 0;
    const cb = b.position?.col ?? 0;
    if (ca !== cb) return ca - cb;
    return a.code < b.code ? -1 : a.code > b.code ? 1 : 0;
  });
}
