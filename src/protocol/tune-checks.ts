/**
 * Checks of a protocol's tuning: lists of candidate values need a tune section and it needs
 * them; `prefer` names every tuned setting once, in an order its values have; and the inner
 * split can be drawn on every outer training part (docs/split-spec.md §9). Pure.
 */
import { error, warning, type Problem } from '../problems/problem.js';
import { assignFolds } from '../split/assign.js';
import { emptyFolds, type Assignment } from '../split/assignment.js';
import { splitRules } from '../split/registry.js';
import type { Table } from '../table/table.js';
import { didYouMean } from '../util/suggest.js';
import { partsFor } from './grid.js';
import { testsFoldOneOnly, type Protocol, type TunedSetting } from './types.js';

type At = (path: (string | number)[], key?: boolean) => Partial<Problem>;

/** Where a tuned setting's list is written. */
export function gridPath(p: Pick<Protocol, 'preprocess'>, g: TunedSetting): (string | number)[] {
  return 'step' in g.target
    ? ['preprocess', g.target.step, p.preprocess[g.target.step].step, g.target.setting]
    : ['model', 'options', g.target.option];
}

/** The grid against the tune section, before any data is looked at. */
export function gridProblems(p: Protocol, at: At): Problem[] {
  const out: Problem[] = [];
  if (p.grid.length && !p.tune) {
    const g = p.grid[0];
    out.push(
      error(
        'grid-without-tune',
        `${g.name} lists ${g.values.length} candidate values, but the protocol has no tune section to choose among them`,
        at(gridPath(p, g)),
      ),
    );
  }
  if (!p.tune) return out;
  if (!p.grid.length) {
    out.push(
      error(
        'tune-without-grid',
        'the tune section has nothing to tune: no model option or step setting lists candidate values',
        at(['tune'], true),
      ),
    );
    return out;
  }
  const names = p.grid.map((g) => g.name);
  const seenNames = new Set<string>();
  p.grid.forEach((g) => {
    if (seenNames.has(g.name))
      out.push(
        error('tune-ambiguous-setting', `two ${g.name.split('.')[0]} steps tune ${g.name}, so the name cannot tell them apart`, {
          ...at(gridPath(p, g)),
          hint: 'tune the setting in one of the steps only',
        }),
      );
    seenNames.add(g.name);
  });
  const listed = new Set<string>();
  p.tune.prefer.forEach((q, i) => {
    const g = p.grid.find((x) => x.name === q.name);
    if (!g) {
      out.push(
        error('tune-prefer', `tune.prefer names "${q.name}", which is not a tuned setting`, {
          ...at(['tune', 'prefer', i, q.name], true),
          hint: didYouMean(q.name, names) ?? `tuned settings: ${names.join(', ')}`,
        }),
      );
    } else if (listed.has(q.name)) {
      out.push(error('tune-prefer', `tune.prefer lists ${q.name} twice`, at(['tune', 'prefer', i], true)));
    } else if (q.order !== 'first-listed' && g.values.some((v) => typeof v !== 'number')) {
      out.push(
        error('tune-prefer', `${q.name} has text values, which have no ${q.order} one`, {
          ...at(['tune', 'prefer', i, q.name]),
          hint: 'use first-listed: the order the values are written in',
        }),
      );
    }
    listed.add(q.name);
  });
  const missing = names.filter((n) => !listed.has(n));
  if (missing.length)
    out.push(
      error(
        'tune-prefer',
        `tune.prefer does not say how ties on ${missing.join(', ')} are broken: every tuned setting needs its place in the tie order`,
        { ...at(['tune', 'prefer']), hint: `add ${missing.map((n) => `\`- ${n}: smallest\``).join(', ')} (or largest, first-listed)` },
      ),
    );
  return out;
}

/**
 * Runs a check once per candidate value of each tuned setting (the others at their first value),
 * locating a problem of the tuned setting itself at the value in its list; repeats are dropped.
 */
export function overCandidates(p: Protocol, at: At, check: (q: Protocol, at: At) => Problem[]): Problem[] {
  if (!p.grid.length) return check(p, at);
  const out: Problem[] = [];
  const seen = new Set<string>();
  p.grid.forEach((g, gi) => {
    const where = JSON.stringify(gridPath(p, g));
    g.values.forEach((_, v) => {
      const pick = new Int32Array(p.grid.length);
      pick[gi] = v;
      const atValue: At = (path, key) => (JSON.stringify(path) === where ? at([...path, v]) : at(path, key));
      for (const q of check({ ...p, ...partsFor(p, pick) }, atValue)) {
        const id = `${q.code}|${q.message}|${JSON.stringify(q.path)}`;
        if (seen.has(id)) continue;
        seen.add(id);
        out.push(q);
      }
    });
  });
  return out;
}

/** The inner split against every outer training part: its rule's checks, groups, seed, and no empty inner fold. */
export function innerSplitProblems(p: Protocol, table: Table, a: Assignment, at: At): Problem[] {
  const t = p.tune;
  if (!t || !p.grid.length) return [];
  const s = t.split;
  const rule = splitRules[s.rule];
  if (rule.uses.seed && s.seed === undefined)
    return [
      error('missing-seed', `tune.split uses rule ${s.rule}, which needs a seed, and the pinned outer split has none to lend`, {
        ...at(['tune', 'split'], true),
        hint: 'add `seed:` to tune.split',
      }),
    ];
  if (rule.uses.groups && !table.groups)
    return [error('missing-group', `tune.split rule ${s.rule} needs data.group to name the group column`, at(['tune', 'split', 'rule']))];
  const out: Problem[] = [];
  if (table.groups && !rule.uses.groups)
    out.push(
      warning(
        'inner-split-ignores-groups',
        `the inner split (${s.rule}) ignores data.group, so rows of one ${p.data.group} can sit on both sides of an inner fold and flatter the candidates that memorize them`,
        { ...at(['tune', 'split', 'rule']), hint: 'use grouped-kfold or leave-group-out for the inner split too' },
      ),
    );
  const n = table.ids.length;
  const k = table.classes.length;
  const folds = testsFoldOneOnly(p) ? [1] : Array.from({ length: a.folds }, (_, i) => i + 1);
  for (let r = 1; r <= a.repeats; r++) {
    for (const f of folds) {
      const rows: number[] = [];
      for (let i = 0; i < n; i++) if (a.fold[(r - 1) * n + i] !== f) rows.push(i);
      const classCounts = new Int32Array(k);
      for (const i of rows) classCounts[table.y[i]]++;
      const present = table.classes.filter((_, c) => classCounts[c] > 0);
      const groups = table.groups && rows.map((i) => table.groups![i]);
      const checked = rule.check(s, {
        rows: rows.length,
        classCounts: classCounts.filter((c) => c > 0),
        classes: present,
        groupCount: groups && new Set(groups).size,
      });
      const inPart = `in the training part of repeat ${r}, fold ${f} (${rows.length} rows), the inner split fails: `;
      for (const q of checked) out.push(error(q.code, inPart + q.message, { ...at(['tune', ...q.path]), hint: q.hint }));
      if (checked.length) return out;
      // Stable assignment and holdout can draw an empty inner part; balanced k-fold cannot once the checks pass.
      if (s.assign !== 'stable' && rule.tests !== 'fold-1') continue;
      const ids = rows.map((i) => table.ids[i]);
      const inner = assignFolds({ ids, y: Int32Array.from(rows, (i) => table.y[i]), classCount: k, groups }, s, { repeat: r, fold: f });
      const empty =
        rule.tests === 'fold-1'
          ? Array.from({ length: inner.repeats }, (_, j) => inner.fold.subarray(j * ids.length, (j + 1) * ids.length)).some(
              (part) => part.every((x) => x === 1) || part.every((x) => x !== 1),
            )
          : emptyFolds(inner).length > 0;
      if (empty) {
        out.push(
          error('inner-split', `${inPart}it leaves an inner ${rule.tests === 'fold-1' ? 'part' : 'fold'} without a row`, {
            ...at(['tune', 'split']),
            hint: 'use fewer inner folds, a larger test-fraction, or assign: balanced',
          }),
        );
        return out;
      }
    }
  }
  return out;
}
