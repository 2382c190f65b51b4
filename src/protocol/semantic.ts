/**
 * Checks of a schema-valid protocol against its data (and pinned file). Pure:
 * the caller has read and hashed the files; this only compares and counts.
 */
import { models, withDefaults } from '../model/registry.js';
import { error, hasErrors, warning, type Problem } from '../problems/problem.js';
import { gridProblems, innerSplitProblems, overCandidates } from './tune-checks.js';
import { assignFolds } from '../split/assign.js';
import { emptyFolds, type Assignment } from '../split/assignment.js';
import { parsePinned } from '../split/pinned.js';
import { splitRules } from '../split/registry.js';
import { transforms } from '../preprocess/registry.js';
import type { Table } from '../table/table.js';
import { locate, type SourceDocument } from './document.js';
import { isPinned, testsFoldOneOnly, type Protocol, type RuleSplit } from './types.js';

export interface DataEvidence {
  table: Table;
  sha256: string;
  /** The pinned assignment file's bytes and hash, when the protocol pins its split. */
  pinned?: { bytes: Uint8Array; sha256: string; shownAs: string };
  /** Split keys of the table's ids derived by the shell (see SplitInput.idKeys). */
  idKeys?: (seed: number, repeat: number) => Uint8Array | undefined;
}

export interface SemanticResult {
  problems: Problem[];
  assignment?: Assignment;
}

export function checkAgainstData(p: Protocol, source: SourceDocument, ev: DataEvidence): SemanticResult {
  const file = source.file;
  const problems: Problem[] = [];
  const at = (path: (string | number)[], key = false) => ({ file, path, position: locate(source, path, key) });
  const { table } = ev;
  if (ev.sha256 !== p.data.sha256) {
    problems.push(
      error('data-hash-mismatch', `the data file's SHA-256 is ${ev.sha256}, not the ${p.data.sha256} this protocol records`, {
        ...at(['data', 'sha256']),
        hint: 'if the data changed on purpose, put the new hash here (`foldseal hash FILE`)',
      }),
    );
  }
  const classCounts = new Int32Array(table.classes.length);
  for (let i = 0; i < table.y.length; i++) classCounts[table.y[i]]++;
  if (p.data.positive !== undefined && !table.classes.includes(p.data.positive)) {
    problems.push(
      error('unknown-class', `positive class "${p.data.positive}" is not a label value`, {
        ...at(['data', 'positive']),
        hint: `classes are: ${table.classes.join(', ')}`,
      }),
    );
  }
  if (table.ignoredColumns.length && !Array.isArray(p.data.features)) {
    problems.push(
      warning(
        'text-columns-ignored',
        `text column${table.ignoredColumns.length === 1 ? '' : 's'} left out of the features: ${table.ignoredColumns.join(', ')}`,
        at(['data', 'label'], true),
      ),
    );
  }
  problems.push(...missingValueProblems(p, table, at));
  problems.push(...gridProblems(p, at));
  problems.push(...commandProblems(p, at));
  problems.push(...overCandidates(p, at, (q, atValue) => preprocessProblems(q, table, atValue)));

  let assignment: Assignment | undefined;
  if (isPinned(p.split)) {
    const pin = ev.pinned!;
    if (pin.sha256 !== p.split.pinned.sha256) {
      problems.push(
        error(
          'pinned-hash-mismatch',
          `the pinned file's SHA-256 is ${pin.sha256}, not the ${p.split.pinned.sha256} this protocol records`,
          at(['split', 'pinned', 'sha256']),
        ),
      );
    }
    const parsed = parsePinned(pin.bytes, pin.shownAs, table.ids);
    problems.push(...parsed.problems);
    assignment = parsed.assignment;
  } else {
    const s = p.split;
    const n = table.ids.length;
    const rule = splitRules[s.rule];
    if (rule.uses.groups && table.groups === undefined) {
      problems.push(error('missing-group', `split rule ${s.rule} needs data.group to name the group column`, at(['split', 'rule'])));
    } else {
      const groupCount = table.groups ? new Set(table.groups).size : undefined;
      for (const q of rule.check(s, { rows: n, classCounts, classes: table.classes, groupCount }))
        problems.push(error(q.code, q.message, q.hint === undefined ? at(q.path) : { ...at(q.path), hint: q.hint }));
    }
    if (problems.every((q) => q.severity !== 'error')) {
      assignment = assignFolds(
        { ids: table.ids, y: table.y, classCount: table.classes.length, groups: table.groups, idKeys: ev.idKeys },
        s,
      );
      if (rule.tests === 'fold-1') {
        // Per repeat: a stable holdout draws each row independently, so any repeat can come out empty.
        for (let r = 1; r <= assignment.repeats; r++) {
          const test = assignment.fold.subarray((r - 1) * n, r * n).filter((f) => f === 1).length;
          if (test === 0 || test === n) {
            problems.push(
              error(
                'empty-part',
                `test-fraction ${s.testFraction} leaves the ${test === 0 ? 'test' : 'training'} part empty for ${n} ` +
                  `rows${assignment.repeats > 1 ? ` in repeat ${r}` : ''}`,
                at(['split', 'test-fraction']),
              ),
            );
            break;
          }
        }
      } else {
        const empty = emptyFolds(assignment);
        if (empty.length)
          problems.push(
            error(
              'empty-fold',
              `the split leaves ${empty.length} fold${empty.length === 1 ? '' : 's'} without a row (repeat ${empty[0].repeat}, ` +
                `fold ${empty[0].fold}${empty.length > 1 ? ', …' : ''})${s.assign === 'stable' ? STABLE_EMPTY : ''}`,
              { ...at(['split']), hint: 'use fewer folds, more rows, or assign: balanced' },
            ),
          );
      }
    }
  }
  // The model's checks see the smallest training part when the split could be drawn, else all rows.
  const outerSmallest = assignment ? smallestTraining(p, table.ids.length, assignment) : table.ids.length;
  // A tuned model is also fitted on the inner training parts, which are smaller still.
  const smallest = p.tune && p.grid.length ? innerTrainingBound(p.tune.split, outerSmallest) : outerSmallest;
  problems.push(...overCandidates(p, at, (q, atValue) => modelProblems(q, table, smallest, atValue)));
  if (assignment) problems.push(...assignmentProblems(p, table, assignment, at));
  if (assignment && !hasErrors(problems)) problems.push(...innerSplitProblems(p, table, assignment, at));
  return { problems, assignment };
}

/** A command model runs in the shell, fold by fold: what it cannot be combined with yet, and `command` without its kind. */
function commandProblems(p: Protocol, at: At): Problem[] {
  const out: Problem[] = [];
  if (p.model.command && p.model.kind !== 'command')
    out.push(
      error('command-without-kind', `model.command is set but model.kind is ${p.model.kind}`, {
        ...at(['model', 'command'], true),
        hint: 'use kind: command, or remove model.command',
      }),
    );
  if (p.model.kind !== 'command') return out;
  if (p.statistics?.permutation)
    out.push(
      error(
        'command-unsupported',
        'a permutation test with a command model is not supported yet (it would run the program once per fold for every permutation)',
        {
          ...at(['statistics', 'permutation'], true),
          hint: 'remove statistics.permutation; bootstrap intervals work',
        },
      ),
    );
  if (p.tune)
    out.push(
      error('command-unsupported', 'tuning inside the folds is not supported with a command model yet', {
        ...at(['tune'], true),
        hint: 'tune inside your program (on the training table it is given), or use a built-in model',
      }),
    );
  return out;
}

const STABLE_EMPTY = "; assign: stable draws each row's fold on its own, so small data can leave a fold empty";

type At = (path: (string | number)[], key?: boolean) => Partial<Problem>;

function missingValueProblems(p: Protocol, table: Table, at: At): Problem[] {
  const hasImpute = p.preprocess.some((s) => transforms[s.step].fillsMissing);
  if (hasImpute || table.hasMissing === false) return [];
  const { rows, cols, data } = table.X;
  const perColumn = new Int32Array(cols);
  for (let r = 0; r < rows; r++) {
    const b = r * cols;
    for (let j = 0; j < cols; j++) if (data[b + j] !== data[b + j]) perColumn[j]++;
  }
  const out: Problem[] = [];
  perColumn.forEach((count, j) => {
    if (count > 0)
      out.push(
        error(
          'missing-without-impute',
          `feature "${table.featureNames[j]}" has ${count} missing cell${count === 1 ? '' : 's'} and no impute step fills them`,
          { ...at(['preprocess'], true), hint: 'add `{impute: {by: median}}` to preprocess, or leave the column out' },
        ),
      );
  });
  return out.slice(0, 10);
}

function preprocessProblems(p: Protocol, table: Table, at: At): Problem[] {
  const out: Problem[] = [];
  let width = table.X.cols;
  p.preprocess.forEach((s, i) => {
    const checked = transforms[s.step].check(s, { width, classCount: table.classes.length, before: p.preprocess.slice(0, i) });
    for (const q of checked.problems) {
      const where = at(['preprocess', i, s.step, ...q.path]);
      const extra = q.hint === undefined ? where : { ...where, hint: q.hint };
      out.push(q.severity === 'error' ? error(q.code, q.message, extra) : warning(q.code, q.message, extra));
    }
    width = checked.width;
  });
  return out;
}

function modelProblems(p: Protocol, table: Table, smallestTrain: number, at: At): Problem[] {
  const options = withDefaults(p.model.kind, p.model.options);
  return models[p.model.kind].check(options, { classes: table.classes, smallestTrain }).map((q) => {
    const where = at(['model', 'options', ...q.path], q.key);
    return error(q.code, q.message, q.hint === undefined ? where : { ...where, hint: q.hint });
  });
}

/** A lower bound on the inner training part of an outer training part of n rows (balanced dealing: a fold holds at most ⌈n/k⌉). */
function innerTrainingBound(s: RuleSplit, n: number): number {
  if (splitRules[s.rule].tests === 'fold-1') return n - Math.ceil(n * (s.testFraction ?? 0));
  return splitRules[s.rule].uses.folds ? n - Math.ceil(n / s.folds) : n - 1;
}

/** Rows of the smallest training part over every tested fold of every repeat. */
function smallestTraining(p: Protocol, n: number, a: Assignment): number {
  let smallest = n;
  for (let r = 1; r <= a.repeats; r++) {
    const size = new Int32Array(a.folds + 1);
    for (let i = 0; i < n; i++) size[a.fold[(r - 1) * n + i]]++;
    // Holdout trains on fold 2 only; every other assignment trains on all rows outside the test fold.
    const testFolds = testsFoldOneOnly(p) ? [1] : Array.from({ length: a.folds }, (_, k) => k + 1);
    for (const f of testFolds) smallest = Math.min(smallest, n - size[f]);
  }
  return smallest;
}

function assignmentProblems(p: Protocol, table: Table, a: Assignment, at: At): Problem[] {
  const out: Problem[] = [];
  if (p.reconcile.rule === 'majority-vote' && p.reconcile.tie === undefined) {
    const models = testsFoldOneOnly(p) ? a.repeats : a.folds * a.repeats;
    if (models % 2 === 0 || table.classes.length > 2) {
      out.push(
        error(
          'tie-rule-needed',
          `majority-vote over ${models} fold models and ${table.classes.length} classes can tie, and reconcile.tie is not set`,
          { ...at(['reconcile', 'rule']), hint: 'add `tie: mean-probability`, `tie: abstain` or `tie: class-order`' },
        ),
      );
    }
  }
  return out;
}
