/**
 * Runs a command model's program (docs/command-models.md): per fold, a fresh temporary folder
 * with the in-fold preprocessed training table and a request; `PROGRAM… fit FOLDER` leaves its
 * model in FOLDER/model; `PROGRAM… predict FOLDER` answers FOLDER/rows.csv in FOLDER/proba.csv.
 * No shell; the program's own folder is the protocol's; a time limit per call; every output
 * checked; the temporary folders are always removed. Only called after the user consented.
 */
import { spawn } from 'node:child_process';
import { mkdir, mkdtemp, readdir, readFile, rm, writeFile } from 'node:fs/promises';
import { availableParallelism, tmpdir } from 'node:os';
import { join, relative, resolve, sep } from 'node:path';
import { error, FitError, FoldsealError, type Problem } from '../problems/problem.js';
import type { CommandSpec, Protocol } from '../protocol/types.js';
import { applyPipeline, prunePipeline, type FittedPipeline } from '../preprocess/pipeline.js';
import { columnMajor, fitPipelineOnRows } from '../preprocess/by-columns.js';
import { wantsColumns } from '../run/executor.js';
import type { FoldFit } from '../run/fit-fold.js';
import { contractCsv, CONTRACT_VERSION, foldSeed, readProba, requestJson } from '../run/command-contract.js';
import { takeInt, type Matrix } from '../table/matrix.js';
import { sha256Bytes } from '../util/sha256.js';
import { isPinned, type ReconcileRule } from '../protocol/types.js';
import type { GivenProbabilities } from '../reconcile/reconcile.js';

/** A fold model of a command model as models.json keeps it: the model folder's files, and what the program reported of itself. */
export interface FolderModel {
  folder: Record<string, { sha256: string; base64: string }>;
  /** FOLDER/model/versions.json when the program wrote one (its runtime versions), else null. */
  versions: Record<string, unknown> | null;
}

export interface CommandContext {
  spec: CommandSpec;
  /** The protocol's folder: relative paths in the command resolve here, and the program runs here. */
  cwd: string;
  classes: readonly string[];
  options: Record<string, unknown>;
  /** Where a failure is reported: the protocol file and the position of model.command. */
  at: Partial<Problem>;
}

const STDERR_LINES = 12;

/** The command line as a user would type it, for messages. */
export function commandLine(spec: CommandSpec, mode: string, folder = 'FOLDER'): string {
  return [...spec.run, mode, folder].map((a) => (/^[\w@%+=:,./-]+$/.test(a) ? a : `'${a.replaceAll("'", "'\\''")}'`)).join(' ');
}

/** Runs the program once in `mode` on `folder`; resolves when it exited 0 in time, else throws a located FoldsealError. */
async function runProgram(ctx: CommandContext, mode: 'fit' | 'predict', folder: string, where: string): Promise<void> {
  const [program, ...args] = ctx.spec.run;
  // In foldseal's own process group: a Ctrl-C at the terminal stops the program with foldseal, never
  // leaving it running on its own.
  const child = spawn(program, [...args, mode, folder], { cwd: ctx.cwd, stdio: ['ignore', 'ignore', 'pipe'] });
  let stderr = '';
  child.stderr.setEncoding('utf8');
  child.stderr.on('data', (s: string) => {
    stderr = (stderr + s).slice(-20000);
  });
  let timedOut = false;
  const timer = setTimeout(() => {
    timedOut = true;
    child.kill('SIGKILL');
  }, ctx.spec.timeLimit * 1000);
  const result = await new Promise<{ code: number | null; signal: NodeJS.Signals | null; spawnError?: NodeJS.ErrnoException }>((done) => {
    child.on('error', (e: NodeJS.ErrnoException) => done({ code: null, signal: null, spawnError: e }));
    child.on('close', (code, signal) => done({ code, signal }));
  });
  clearTimeout(timer);
  const shownCommand = commandLine(ctx.spec, mode);
  const tail = stderr.trimEnd().split('\n').slice(-STDERR_LINES).join('\n    ');
  const last = tail ? `; the last lines of its stderr:\n    ${tail}` : ' and wrote nothing to stderr';
  if (result.spawnError)
    throw new FoldsealError(
      error(
        'command-failed',
        `${where}: \`${shownCommand}\` could not be started (${result.spawnError.code}: ${result.spawnError.message})`,
        {
          ...ctx.at,
          hint: `is ${program} installed, and is the path right? It is looked up from ${ctx.cwd}`,
        },
      ),
      1,
    );
  if (timedOut)
    throw new FoldsealError(
      error(
        'command-timeout',
        `${where}: \`${shownCommand}\` ran longer than the time limit of ${ctx.spec.timeLimit} s and was stopped${last}`,
        {
          ...ctx.at,
          hint: 'raise model.command.time-limit if the program needs longer',
        },
      ),
      1,
    );
  if (result.code !== 0)
    throw new FoldsealError(
      error(
        'command-failed',
        `${where}: \`${shownCommand}\` ${result.signal ? `was ended by signal ${result.signal}` : `exited with code ${result.code}`}${last}`,
        ctx.at,
      ),
      1,
    );
}

/** Every regular file under `dir` (names with '/'), sorted; a link or other special entry is an error, never followed. */
async function readFolder(dir: string, where: string, ctx: CommandContext): Promise<FolderModel['folder']> {
  const out: FolderModel['folder'] = {};
  const walk = async (d: string): Promise<void> => {
    const entries = await readdir(d, { withFileTypes: true });
    for (const e of entries.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0))) {
      const full = join(d, e.name);
      if (e.isDirectory()) await walk(full);
      else if (e.isFile()) {
        const bytes = await readFile(full);
        out[relative(dir, full).split(sep).join('/')] = { sha256: sha256Bytes(bytes), base64: bytes.toString('base64') };
      } else
        throw new FoldsealError(
          error('command-output', `${where}: the model folder holds ${relative(dir, full)}, which is not a regular file or folder`, ctx.at),
          1,
        );
    }
  };
  await walk(dir);
  return out;
}

/** Writes a saved model folder back under `dir` (names are checked to stay inside it). */
async function writeFolder(dir: string, folder: FolderModel['folder']): Promise<void> {
  for (const [name, file] of Object.entries(folder)) {
    const target = resolve(dir, name);
    if (!target.startsWith(resolve(dir) + sep))
      throw new FoldsealError(error('command-output', `a saved model folder names ${name}, outside itself`), 1);
    await mkdir(resolve(target, '..'), { recursive: true });
    const bytes = Buffer.from(file.base64, 'base64');
    if (sha256Bytes(bytes) !== file.sha256)
      throw new FoldsealError(
        error('command-output', `the saved model file ${name} does not match its SHA-256`, { hint: 're-run the protocol' }),
        1,
      );
    await writeFile(target, bytes);
  }
}

/** A fresh temporary folder for one call, always removed afterwards. */
async function inTempFolder<T>(work: (dir: string) => Promise<T>): Promise<T> {
  const dir = await mkdtemp(join(tmpdir(), 'foldseal-fold-'));
  try {
    return await work(dir);
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

async function predictIn(
  ctx: CommandContext,
  dir: string,
  ids: readonly string[],
  names: readonly string[],
  X: Matrix,
  where: string,
): Promise<Float64Array> {
  await writeFile(join(dir, 'rows.csv'), contractCsv(ids, names, X));
  await writeFile(
    join(dir, 'request.json'),
    requestJson({
      contract: CONTRACT_VERSION,
      mode: 'predict',
      classes: [...ctx.classes],
      options: ctx.options,
      repeat: 0,
      fold: 0,
      rows: X.rows,
      features: X.cols,
    }),
  );
  await runProgram(ctx, 'predict', dir, where);
  const text = await readFile(join(dir, 'proba.csv')).catch(() => undefined);
  if (text === undefined)
    throw new FoldsealError(
      error('command-output', `${where}: \`${commandLine(ctx.spec, 'predict')}\` exited 0 but wrote no proba.csv`, ctx.at),
      1,
    );
  const read = readProba(text, ids, ctx.classes);
  if (read.problem) throw new FoldsealError(error('command-output', `${where}: ${read.problem}`, ctx.at), 1);
  return read.proba!;
}

export interface FoldRows {
  repeat: number;
  fold: number;
  train: Int32Array;
  /** Empty for a refit. */
  test: Int32Array;
}

/** One fold: the pipeline fitted here on the training rows, the program fitted on their transform, then asked about the test rows. */
export async function commandFold(
  p: Protocol,
  ctx: CommandContext,
  table: { ids: readonly string[]; y: Int32Array; classes: readonly string[]; featureNames: readonly string[]; X: Matrix },
  plan: FoldRows,
): Promise<FoldFit> {
  const where = plan.fold === 0 ? 'the refit on every row' : `repeat ${plan.repeat}, fold ${plan.fold}`;
  const k = table.classes.length;
  const yTrain = takeInt(table.y, plan.train);
  let pipeline: FittedPipeline;
  let trainX: Matrix;
  try {
    const fitted = fitPipelineOnRows(
      p.preprocess,
      table.X,
      plan.train,
      yTrain,
      k,
      table.featureNames,
      wantsColumns(p) ? columnMajor(table.X) : undefined,
    );
    pipeline = prunePipeline(fitted.pipeline, table.X.cols);
    trainX = fitted.X;
  } catch (e) {
    if (e instanceof FitError) throw new FoldsealError(error(e.code, `${e.message} (${where})`, { ...ctx.at, hint: e.hint }), 1);
    throw e;
  }
  return inTempFolder(async (dir) => {
    const ids = Array.from(plan.train, (r) => table.ids[r]);
    await writeFile(
      join(dir, 'train.csv'),
      contractCsv(
        ids,
        pipeline.columns,
        trainX,
        Array.from(yTrain, (c) => table.classes[c]),
      ),
    );
    const seed = foldSeed(isPinned(p.split) ? undefined : p.split.seed, plan.repeat, plan.fold);
    await writeFile(
      join(dir, 'request.json'),
      requestJson({
        contract: CONTRACT_VERSION,
        mode: 'fit',
        classes: [...table.classes],
        options: ctx.options,
        repeat: plan.repeat,
        fold: plan.fold,
        seed,
        rows: trainX.rows,
        features: trainX.cols,
      }),
    );
    await mkdir(join(dir, 'model'));
    await runProgram(ctx, 'fit', dir, where);
    const folder = await readFolder(join(dir, 'model'), where, ctx);
    if (Object.keys(folder).length === 0)
      throw new FoldsealError(
        error('command-output', `${where}: \`${commandLine(ctx.spec, 'fit')}\` exited 0 but left FOLDER/model empty`, ctx.at),
        1,
      );
    const versions = folder['versions.json'] ? parseVersions(folder['versions.json'].base64) : null;
    const proba = plan.test.length
      ? await predictIn(
          ctx,
          dir,
          Array.from(plan.test, (r) => table.ids[r]),
          pipeline.columns,
          applyPipeline(pipeline, table.X, plan.test),
          where,
        )
      : new Float64Array(0);
    const model: FolderModel = { folder, versions };
    return { pipeline, model, proba };
  });
}

function parseVersions(base64: string): Record<string, unknown> | null {
  try {
    const v = JSON.parse(Buffer.from(base64, 'base64').toString('utf8'));
    return v && typeof v === 'object' && !Array.isArray(v) ? v : null;
  } catch {
    return null;
  }
}

/** `work` on every item, at most `jobs` at a time; results in item order. The first failure stops new starts and is thrown once the running ones end. */
async function pooled<T, R>(
  items: readonly T[],
  jobs: number,
  work: (item: T) => Promise<R>,
  onDone?: (done: number, total: number) => void,
): Promise<R[]> {
  const out: R[] = new Array(items.length);
  let next = 0;
  let done = 0;
  let failed: unknown;
  const worker = async () => {
    while (next < items.length && failed === undefined) {
      const i = next++;
      try {
        out[i] = await work(items[i]);
        done++;
        onDone?.(done, items.length);
      } catch (e) {
        failed ??= e;
      }
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(jobs, items.length)) }, worker));
  if (failed !== undefined) throw failed;
  return out;
}

/** Every plan's fold, up to `jobs` programs at a time; results in plan order whatever order they finish in. */
export function commandFolds(
  p: Protocol,
  ctx: CommandContext,
  table: Parameters<typeof commandFold>[2],
  plans: readonly FoldRows[],
  jobs = availableParallelism(),
  onFold?: (done: number, total: number) => void,
): Promise<FoldFit[]> {
  return pooled(plans, jobs, (plan) => commandFold(p, ctx, table, plan), onFold);
}

type SavedFolder = { pipeline: FittedPipeline; model: unknown; repeat: number; fold: number };

/**
 * What the saved models say about new rows, up to `jobs` programs at a time: every fold model
 * (their agreement is reported under every rule), and the refit model under rule refit.
 */
export async function newRowProbabilities(
  ctx: CommandContext,
  models: { folds: readonly SavedFolder[]; refit?: SavedFolder | null; rule: ReconcileRule },
  ids: readonly string[],
  X: Matrix,
  jobs = availableParallelism(),
): Promise<GivenProbabilities> {
  const folds = await pooled(models.folds, jobs, (m) => predictSaved(ctx, m, ids, X));
  const refit = models.rule === 'refit' && models.refit ? await predictSaved(ctx, models.refit, ids, X) : undefined;
  return { folds, refit };
}

/** A saved fold model's probabilities for new rows (already in the saved feature order), through its pipeline and the program. */
async function predictSaved(ctx: CommandContext, saved: SavedFolder, ids: readonly string[], X: Matrix): Promise<Float64Array> {
  const where = saved.fold === 0 ? 'the refit model' : `the model of repeat ${saved.repeat}, fold ${saved.fold}`;
  return inTempFolder(async (dir) => {
    await writeFolder(join(dir, 'model'), (saved.model as FolderModel).folder);
    return predictIn(ctx, dir, ids, saved.pipeline.columns, applyPipeline(saved.pipeline, X), where);
  });
}

/** Each dependency file against its recorded SHA-256 (before a run, and after it: a program must not change them). */
export async function commandFileProblems(
  spec: CommandSpec,
  cwd: string,
  at: (path: (string | number)[]) => Partial<Problem>,
  after = false,
): Promise<Problem[]> {
  const out: Problem[] = [];
  for (const [i, f] of spec.files.entries()) {
    let bytes: Buffer;
    try {
      bytes = await readFile(resolve(cwd, f.file));
    } catch (e) {
      const why = (e as NodeJS.ErrnoException).code;
      out.push(
        error(
          'command-failed',
          `the model's file ${f.file} cannot be read (${why})${after ? ' after the run' : ''}`,
          at(['model', 'command', 'files', i, 'file']),
        ),
      );
      continue;
    }
    const sha = sha256Bytes(bytes);
    if (sha !== f.sha256)
      out.push(
        after
          ? error(
              'command-files-changed',
              `the model's file ${f.file} changed during the run (SHA-256 now ${sha}); nothing was written`,
              at(['model', 'command', 'files', i, 'sha256']),
            )
          : error(
              'command-file-hash-mismatch',
              `the model's file ${f.file} has SHA-256 ${sha}, not the ${f.sha256} this protocol records`,
              at(['model', 'command', 'files', i, 'sha256']),
            ),
      );
  }
  return out;
}
