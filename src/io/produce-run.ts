/** Validate a protocol file and run it: the shared shell of `run` and `verify --rerun`. */
import { hasErrors } from '../problems/problem.js';
import { assembleResult, planFolds, type CvHooks } from '../run/cross-validate.js';
import type { FoldFit } from '../run/fit-fold.js';
import { asUserError, type OutputSink, refitRows, runProtocol, type RunInput, type RunOutput } from '../run/run.js';
import { crossValidateInWorkers } from './fold-workers.js';
import type { RowThread } from './row-helper.js';
import type { Protocol } from '../protocol/types.js';
import { strategyFor } from '../run/executor.js';
import { permutedScoresInWorkers, type PermutationProgress } from './permutation-workers.js';
import { validateProtocol, type ValidationReport } from './validate.js';
import type { PathPolicy } from './path-policy.js';
import { lockedRepoProblems } from './repo-guard.js';
import { auditReport } from './audit-protocol.js';
import type { AuditResult } from '../audit/audit.js';
import { dirname, resolve } from 'node:path';
import { assignmentSha256 } from '../split/csv.js';
import { error, FoldsealError } from '../problems/problem.js';
import { locate } from '../protocol/document.js';
import type { GivenProbabilities } from '../reconcile/reconcile.js';
import type { SavedModel } from '../reconcile/models-file.js';
import type { CommandContext } from './command-model.js';
import { collectGarbage } from './heap-flags.js';

/**
 * The largest data file whose moment fits go to the thread that read it. The thread kept alive
 * holds its heap and makes the fits' arrays in its own memory: measured on 1,000,000 × 50
 * (388 MB), 0.4 s faster but 60 MiB more at the peak, which matters more there; on 100,000 × 50
 * (39 MB) about 30 ms faster.
 */
export const MOMENTS_HELPER_BYTES = 64 * 1024 * 1024;

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
  /** The user's consent to run a command model's program (--allow-commands). */
  allowCommands?: boolean;
  /** Programs run at once for a command model (--jobs). */
  jobs?: number;
  /** Where a command model's program runs and its files lie (default: the protocol's folder). */
  commandFolder?: string;
  /**
   * Called once the folds are fitted, right before the outputs are made: where predictions.csv and
   * models.json go as they are made (`run` opens its results folder here, so a protocol that fails
   * leaves no trace).
   */
  outputSink?: (input: RunInput) => Promise<OutputSink>;
}

export async function produceRun(protocolPath: string, options: ProduceOptions = {}): Promise<Produced> {
  // The thread that helps read a large table stays to fit folds, where they go to threads.
  const kept: { thread?: RowThread } = {};
  try {
    return await produce(protocolPath, options, kept);
  } finally {
    await kept.thread?.close();
  }
}

async function produce(protocolPath: string, options: ProduceOptions, kept: { thread?: RowThread }): Promise<Produced> {
  const keepThread = (thread: RowThread, p: Protocol, size: number) => {
    if (p.model.kind === 'command') return false;
    // Fits from class moments are quick: worth the thread only beside the audit, which this thread
    // runs meanwhile, and on a table whose memory is not the constraint (see MOMENTS_HELPER_BYTES).
    if (strategyFor(p) === 'moments' && (!options.audit || size > MOMENTS_HELPER_BYTES)) return false;
    kept.thread = thread;
    return true;
  };
  // Merged parts come with the protocol already validated (and its data read once).
  const report =
    options.merged?.report ?? (await validateProtocol(protocolPath, { access: options.access, describe: options.audit, keepThread }));
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
  // The audit before the folds' memory is needed: once its findings are placed, the description
  // of the file's other columns (which keeps the file's bytes to place cells) can go. With fold
  // workers it runs while they start up and fit.
  let audit: AuditResult | undefined;
  // Between phases that leave tens of MB of dead typed arrays, on a large table (heap-flags.ts).
  const cells = input.table.X.rows * input.table.X.cols;
  const runAudit = () => {
    audit = options.audit ? auditReport(report, { quick: true }) : undefined;
    report.described = undefined;
    // Wanted by the outputs, and ready now: taken while the folds are fitted elsewhere.
    assignmentSha256(input.assignment);
    collectGarbage(cells);
  };
  const merged = options.merged;
  if (merged || input.protocol.model.kind === 'command') runAudit();
  if (input.protocol.model.kind === 'command') {
    const external = await runCommandModel(protocolPath, report, input, options);
    input.external = external.external;
    const out = runProtocol(input, options.hooks, external.cv, undefined, collecting(await options.outputSink?.(input), cells));
    return { report, input, out, audit };
  }
  const cv = merged
    ? assembleResult(input.protocol, input.table, input.assignment, planFolds(input.protocol, input.table, input.assignment), merged.fits)
    : await crossValidateInWorkers(input.protocol, input.table, input.assignment, options.hooks, runAudit, { helper: kept.thread }).catch(
        (e: unknown) => {
          throw asUserError(e, input.protocolFile);
        },
      );
  const permuted = merged
    ? merged.permuted
    : await permutedScoresInWorkers(input.protocol, input.table, input.assignment, options.onPermutation).catch((e: unknown) => {
        throw asUserError(e, input.protocolFile);
      });
  const out = runProtocol(input, options.hooks, cv, permuted, collecting(await options.outputSink?.(input), cells));
  return { report, input, out, audit };
}

/** The sink, and after models.json (the last file made in pieces) a collection of what the two left behind, before the results and the manifest are made. */
function collecting(sink: OutputSink | undefined, cells: number): OutputSink | undefined {
  return (
    sink &&
    ((name, pieces) => {
      const sha256 = sink(name, pieces);
      if (name === 'models.json') collectGarbage(cells);
      return sha256;
    })
  );
}

/** A command model's folds, refit and new-row probabilities, by running its program (only with the user's consent). */
async function runCommandModel(protocolPath: string, report: ValidationReport, input: RunInput, options: ProduceOptions) {
  const { commandFileProblems, commandFold, commandFolds, commandLine, newRowProbabilities } = await import('./command-model.js');
  const p = input.protocol;
  const spec = p.model.command!;
  const at = (path: (string | number)[]) => ({ file: report.file, path, position: report.source && locate(report.source, path) });
  const cwd = options.commandFolder ?? dirname(resolve(protocolPath));
  if (!options.allowCommands)
    throw new FoldsealError(
      error(
        'command-not-allowed',
        `this protocol runs a program of its own: \`${commandLine(spec, 'fit')}\` and \`${commandLine(spec, 'predict')}\` in ${cwd}, ` +
          'once per fold; foldseal runs a program named in a file only when asked',
        { ...at(['model', 'command', 'run']), hint: 'read the program, then pass --allow-commands to run it' },
      ),
      2,
    );
  const ctx: CommandContext = { spec, cwd, classes: input.table.classes, options: p.model.options, at: at(['model', 'command', 'run']) };
  const plans = planFolds(p, input.table, input.assignment);
  const fits = await commandFolds(p, ctx, input.table, plans, options.jobs, options.hooks?.onFold);
  const cv = assembleResult(p, input.table, input.assignment, plans, fits);
  let refit: SavedModel | undefined;
  if (input.refit || p.reconcile.rule === 'refit') {
    const train = refitRows(p, input.table.ids, input.assignment);
    const fit = await commandFold(p, ctx, input.table, { repeat: 0, fold: 0, train, test: new Int32Array(0) });
    refit = { repeat: 0, fold: 0, pipeline: fit.pipeline, model: fit.model };
  }
  let newRows: GivenProbabilities | undefined;
  const nr = input.newRows;
  if (nr) newRows = await newRowProbabilities(ctx, { folds: cv.models, refit, rule: p.reconcile.rule }, nr.ids, nr.X, options.jobs);
  const changed = await commandFileProblems(spec, cwd, at, true);
  if (changed.length) throw new FoldsealError(changed, 1);
  return { cv, external: { refit, newRows } };
}
