import { join, resolve } from 'node:path';
import { writeOutputFile } from '../../io/output-file.js';
import { error, FoldsealError, hasErrors, type Problem } from '../../problems/problem.js';
import { sha256Bytes } from '../../io/hash.js';
import { parseJson, readInput, readRecorded, readResults } from '../../io/results-dir.js';
import { shown } from '../../io/validate.js';
import { applyRows, appliedCsv, disagreementReport } from '../../reconcile/applied.js';
import { heldOutFromPredictions } from '../../reconcile/held-out.js';
import { knownIdProblems } from '../../reconcile/known-ids.js';
import { MODELS_VERSION, neededFeatures, type ModelsFile } from '../../reconcile/models-file.js';
import { tiePossible } from '../../reconcile/reconcile.js';
import type { DataLayout, ReconcileRule, TieRule } from '../../protocol/types.js';
import { tableContent } from '../../io/table-content.js';
import type { ColumnTable } from '../../table/columns.js';
import { readDelimited, textColumn } from '../../table/delimited.js';
import { newRowsLayout } from '../../table/detect.js';
import { delimiterFor } from '../../table/load.js';
import { scoreNewRows, type NewRowScores } from '../../reconcile/new-row-scores.js';
import { newRowScoreLines } from '../cv-table.js';
import { newRowsFromBytes, type NewRows } from '../../table/new-rows.js';
import { commandFileProblems, commandLine, newRowProbabilities } from '../../io/command-model.js';
import type { GivenProbabilities } from '../../reconcile/reconcile.js';
import { asUserError } from '../../run/run.js';
import { withTrainingRows } from '../../io/recorded-table.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems } from '../report-problems.js';

export interface ApplyArgs {
  results: string;
  table: string;
  /** Consent to run a command model's program. */
  allowCommands?: boolean;
  out?: string;
  rule?: ReconcileRule;
  tie?: TieRule;
  layout?: DataLayout;
  /** A copy of the run's data, for fold models that reference their training rows. */
  data?: string;
  /** Let that read go outside the review folders. */
  allowOutside?: boolean;
}

export async function applyCommand(args: ApplyArgs, io: CommandIo): Promise<ExitCode> {
  const modelsPath = join(args.results, 'models.json');
  const results = await readResults(args.results);
  const expected = results.files?.['models.json'];
  const modelBytes = await readRecorded(
    args.results,
    'models.json',
    results,
    'models-hash-mismatch',
    're-run the protocol instead of editing saved models',
  );
  const saved = parseJson(modelBytes, modelsPath) as ModelsFile;
  // Format 1 differs only in copying a k-nearest-neighbour model's training rows into models.json.
  if (saved['foldseal-models'] !== MODELS_VERSION && saved['foldseal-models'] !== 1)
    throw new FoldsealError(
      error(
        'models-version',
        `${shown(modelsPath)} has models format ${JSON.stringify(saved['foldseal-models'])}; this foldseal reads format ${MODELS_VERSION}`,
        { file: shown(modelsPath) },
      ),
      1,
    );
  const predictionBytes = await readRecorded(args.results, 'predictions.csv', results, 'predictions-hash-mismatch');
  const rule = args.rule ?? saved.reconcile.rule;
  const tie = args.tie ?? (rule === saved.reconcile.rule ? saved.reconcile.tie : null);
  const problems: Problem[] = [];
  if (rule === 'majority-vote' && tie === null && tiePossible(saved.folds.length, saved.classes.length)) {
    problems.push(
      error('tie-rule-needed', `majority-vote over ${saved.folds.length} fold models and ${saved.classes.length} classes can tie`, {
        hint: 'add --tie mean-probability, --tie abstain or --tie class-order',
      }),
    );
  }
  if (rule === 'refit' && !saved.refit)
    problems.push(
      error('no-refit-model', 'models.json has no refit model', {
        hint: 'run the protocol with --refit (or reconcile.rule: refit) to save one',
      }),
    );
  if (problems.length) throw new FoldsealError(problems, 2);
  // Fold models that reference their training rows get them back from the run's table.
  const { folds, refit } = await withTrainingRows(args.results, saved, { data: args.data, allowOutside: args.allowOutside });

  const tableBytes = await readInput(args.table);
  const plain = await tableContent(tableBytes, shown(args.table), { file: shown(args.table) });
  if (plain.problem) throw new FoldsealError(plain.problem, 1);
  const label = saved['known-columns'][0];
  const nr = newRowsFromBytes(plain.content, shown(args.table), saved.features, saved.id ?? undefined, saved.missing, {
    known: saved['known-columns'],
    needed: neededFeatures(saved, rule),
    layout: args.layout ?? detectLayout(plain.content, shown(args.table), saved.features, saved.id ?? undefined),
    label,
  });
  if (nr.rows)
    nr.problems.push(
      ...knownIdProblems(nr.rows, shown(args.table), saved.features, new Map(Object.entries(saved['known-rows'] ?? {})), () => ({
        where: `in the run of ${shown(args.results)}`,
      })),
    );
  reportProblems(io, nr.problems, 'text');
  if (hasErrors(nr.problems) || !nr.rows) return 1;
  const given = saved.kind === 'command' ? await commandProbabilities(args, saved, rule, nr.rows) : undefined;
  let rows: ReturnType<typeof applyRows>;
  try {
    rows = applyRows({
      given,
      kind: saved.kind,
      folds,
      refit,
      classes: saved.classes,
      rule,
      tie,
      rows: nr.rows,
      heldOut: heldOutFromPredictions(predictionBytes, saved.classes),
    });
  } catch (e) {
    throw asUserError(e, shown(modelsPath));
  }
  const overridden = rule !== saved.reconcile.rule || tie !== saved.reconcile.tie;
  const comment = overridden
    ? `foldseal apply: rule ${rule}${tie ? `, tie ${tie}` : ''} (the protocol declares ` +
      `${saved.reconcile.rule}${saved.reconcile.tie ? `, tie ${saved.reconcile.tie}` : ''})`
    : undefined;
  const labels = nr.rows.labels && new Map(nr.rows.ids.map((id, i) => [id, nr.rows!.labels![i]]));
  let scores: NewRowScores | undefined;
  if (labels) {
    const s = scoreNewRows(
      rows,
      { byId: labels, classMap: saved['class-map'], missing: saved.missing },
      saved.classes,
      Math.max(0, saved.classes.indexOf(results.positive)),
      results.metrics,
      shown(args.table),
    );
    reportProblems(io, s.problems, 'text');
    if (hasErrors(s.problems)) return 1;
    scores = s.scores;
  }
  const csv = appliedCsv(rows, saved.classes, comment, labels);
  if (args.out) {
    await writeOutputFile(resolve(args.out), csv, shown(resolve(args.out)), true);
    if (overridden) {
      const sidecar = {
        'foldseal-apply': 1,
        rule,
        tie,
        'protocol-rule': saved.reconcile.rule,
        'protocol-tie': saved.reconcile.tie,
        'models-sha256': expected,
        'table-sha256': sha256Bytes(tableBytes),
        'output-sha256': sha256Bytes(csv),
      };
      await writeOutputFile(resolve(`${args.out}.json`), JSON.stringify(sidecar, null, 2) + '\n', shown(resolve(`${args.out}.json`)), true);
    }
    io.err(`wrote ${args.out}${overridden ? ` and ${args.out}.json` : ''}\n`);
  } else io.out(csv);
  io.err(disagreementReport(rows, saved.classes));
  if (scores) io.err(newRowScoreLines(scores, label));
  return 0;
}

/** The layout of a new-rows table when --layout is not given: from its header and first column. */
function detectLayout(
  content: Uint8Array | ColumnTable,
  file: string,
  features: readonly string[],
  id: string | undefined,
): DataLayout | undefined {
  let header: string[];
  let first: string[];
  if (content instanceof Uint8Array) {
    const read = readDelimited(content, delimiterFor(file), file);
    if (!read.table) return undefined;
    header = read.table.header;
    first = textColumn(read.table, 0);
  } else {
    header = content.names;
    first = typeof content.columns[0] === 'number' ? [] : content.columns[0];
  }
  return newRowsLayout(header, first, features, id);
}

/**
 * A command model's saved folders asked about the new rows by running its program, only with
 * --allow-commands; the program's folder is the protocol's as the manifest records it, and its
 * files must still have the hashes the run recorded.
 */
async function commandProbabilities(args: ApplyArgs, saved: ModelsFile, rule: ReconcileRule, rows: NewRows): Promise<GivenProbabilities> {
  const c = saved.command!;
  const spec = { run: c.run, files: c.files, timeLimit: c['time-limit'] };
  const manifestPath = join(args.results, 'manifest.json');
  const manifest = parseJson(await readInput(manifestPath), manifestPath) as { protocol?: { location?: string } };
  const cwd = resolve(args.results, manifest.protocol?.location ?? '.');
  const at = { file: shown(join(args.results, 'models.json')) };
  if (!args.allowCommands)
    throw new FoldsealError(
      error(
        'command-not-allowed',
        `these fold models answer through a program: \`${commandLine(spec, 'predict')}\` in ${cwd}, once per fold model; ` +
          'foldseal runs a program named in a file only when asked',
        { ...at, hint: 'read the program, then pass --allow-commands to run it' },
      ),
      2,
    );
  const files = await commandFileProblems(spec, cwd, () => at);
  if (files.length) throw new FoldsealError(files, 1);
  const ctx = { spec, cwd, classes: saved.classes, options: c.options, at };
  return newRowProbabilities(ctx, { folds: saved.folds, refit: saved.refit, rule }, rows.ids, rows.X);
}
