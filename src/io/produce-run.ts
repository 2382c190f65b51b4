/** Validate a protocol file and run it: the shared shell of `run` and `verify --rerun`. */
import { hasErrors } from '../problems/problem.js';
import { assembleResult, planFolds, type CvHooks } from '../run/cross-validate.js';
import type { FoldFit } from '../run/fit-fold.js';
import { asUserError, runProtocol, type RunInput, type RunOutput } from '../run/run.js';
import { crossValidateInWorkers } from './fold-workers.js';
import { permutedScoresInWorkers, type PermutationProgress } from './permutation-workers.js';
import { validateProtocol, type ValidationReport } from './validate.js';
import type { PathPolicy } from './path-policy.js';
import { lockedRepoProblems } from './repo-guard.js';
import { auditReport } from './audit-protocol.js';
import type { AuditResult } from '../audit/audit.js';

export interface Produced {
  report: ValidationReport;
  input?: RunInput;
  out?: RunOutput;
  audit?: AuditResult;
}

export interface ProduceOptions {
  refit?: boolean;
  hooks?: CvHooks;
  /** Called as permutations of a permutation test are done (for progress lines at the edge). */
  onPermutation?: PermutationProgress;
  /** Where the protocol's files may lie (default: protocolPolicy). */
  access?: PathPolicy;
  /** Leave out the protocol's statistics section (intervals, permutation test): `compare` needs only the folds. */
  withoutStatistics?: boolean;
  /** Apply a locked repository's rules (protocols the gate cannot see, sealed rows). */
  repoRules?: boolean;
  /** The fold fits and permuted scores of merged shard parts, in plan order: used instead of fitting. */
  merged?: { fits: FoldFit[]; permuted?: Float64Array; report: ValidationReport };
  /** Also run the leakage audit (without its selection-bias demonstration): `run` prints its one-line summary. */
  audit?: boolean;
}

export async function produceRun(protocolPath: string, options: ProduceOptions = {}): Promise<Produced> {
  // Merged parts come with the protocol already validated (and its data read once).
  const report = options.merged?.report ?? (await validateProtocol(protocolPath, { access: options.access, describe: options.audit }));
  if (options.repoRules && report.protocol && !report.unreadable) report.problems.push(...(await lockedRepoProblems(protocolPath, report)));
  if (report.unreadable || hasErrors(report.problems) || !report.protocol || !report.table || !report.assignment) return { report };
  const input: RunInput = {
    protocol: options.withoutStatistics ? { ...report.protocol, statistics: undefined } : report.protocol,
    raw: report.raw,
    protocolFile: report.file,
    table: report.table,
    dataSha256: report.dataSha256!,
    joined: report.joined,
    filtered: report.filtered,
    assignment: report.assignment,
    newRows: report.newRows,
    refit: options.refit,
    warnings: report.problems.filter((q) => q.severity === 'warning'),
  };
  const merged = options.merged;
  const cv = merged
    ? assembleResult(input.protocol, input.table, input.assignment, planFolds(input.protocol, input.table, input.assignment), merged.fits)
    : await crossValidateInWorkers(input.protocol, input.table, input.assignment, options.hooks).catch((e: unknown) => {
        throw asUserError(e, input.protocolFile);
      });
  const permuted = merged
    ? merged.permuted
    : await permutedScoresInWorkers(input.protocol, input.table, input.assignment, options.onPermutation).catch((e: unknown) => {
        throw asUserError(e, input.protocolFile);
      });
  const out = runProtocol(input, options.hooks, cv, permuted);
  return { report, input, out, audit: options.audit ? auditReport(report, { quick: true }) : undefined };
}
