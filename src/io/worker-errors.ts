/** Errors across the thread boundary: a fit failure stays a FitError (a user error), anything else a bug with its stack. */
import { FitError } from '../model/types.js';
import type { ProblemCode } from '../problems/problem.js';

export interface WorkerError {
  kind: string;
  code: string;
  message: string;
  hint?: string;
}

export function toWorkerError(e: unknown): WorkerError {
  const user = e instanceof FitError;
  return {
    kind: user ? e.name : 'bug',
    code: user ? e.code : '',
    message: user ? e.message : String((e as Error).stack ?? e),
    hint: user ? e.hint : undefined,
  };
}

export function fromWorkerError(m: WorkerError): Error {
  return m.kind === 'FitError' ? new FitError(m.code as ProblemCode, m.message, m.hint) : new Error(m.message);
}
