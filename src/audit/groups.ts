/**
 * Rows of one subject (patient, donor, mouse, …) in both training and test: the model meets the
 * subject again and scores too well. Looks at columns named like a subject and at the declared
 * data.group when the split does not keep groups together. Pure.
 */
import { note, warning, type Problem } from '../problems/problem.js';
import { isPinned } from '../protocol/types.js';
import { splitRules } from '../split/registry.js';
import { isNumberText } from '../table/number.js';
import { AUDIT_CODE } from './kinds.js';
import { type AuditInput, listed, plural, repeatsSpanned } from './input.js';
import { namesSubject } from './thresholds.js';

/** Groups with two or more rows whose rows do not all share one fold, in table row order of their first row. */
export function spanningGroups(values: readonly string[], input: Pick<AuditInput, 'assignment'>, missing: ReadonlySet<string>) {
  const rowsOf = new Map<string, number[]>();
  values.forEach((v, r) => {
    if (missing.has(v)) return;
    const list = rowsOf.get(v);
    if (list) list.push(r);
    else rowsOf.set(v, [r]);
  });
  const repeated = [...rowsOf].filter(([, rows]) => rows.length > 1);
  const spanning = repeated.filter(([, rows]) => repeatsSpanned(input.assignment, rows).length > 0).map(([name]) => name);
  return { groups: rowsOf.size, repeated: repeated.length, spanning };
}

/**
 * A text column whose values look like subject ids: not numbers, at least a tenth of the rows
 * distinct, and each value on 1.5 to 10 rows on average (a patient's repeated samples, not a
 * category such as sex or site). Reported as a note: only its name or a declaration says for sure.
 */
export function looksLikeGroups(values: readonly string[], missing: ReadonlySet<string>): boolean {
  const present = values.filter((v) => !missing.has(v));
  if (present.length < 10 || present.every(isNumberText)) return false;
  const distinct = new Set(present).size;
  const perValue = present.length / distinct;
  return distinct >= present.length / 10 && perValue >= 1.5 && perValue <= 10;
}

export function groupFindings(input: AuditInput): Problem[] {
  const p = input.protocol;
  const grouped = !isPinned(p.split) && splitRules[p.split.rule].uses.groups;
  const missing = new Set(['', ...p.data.missing]);
  const candidates: { name: string; values: readonly string[]; at: Partial<Problem>; why: string; note?: boolean }[] = [];
  if (p.data.group !== undefined && !grouped && input.table.groups)
    candidates.push({
      name: p.data.group,
      values: input.table.groups,
      at: input.protocolAt(['split']),
      why: 'declared as data.group',
    });
  for (const c of input.described.covariates) {
    if (c.name === p.data.group) continue;
    const { line, col, file } = c.at;
    const at = { file, position: { line, col } };
    if (namesSubject(c.name)) candidates.push({ name: c.name, values: c.values, at, why: 'named like a subject' });
    else if (looksLikeGroups(c.values, missing))
      candidates.push({ name: c.name, values: c.values, at, why: 'its values repeat like ids of subjects', note: true });
  }
  const out: Problem[] = [];
  for (const c of candidates) {
    const { groups, repeated, spanning } = spanningGroups(c.values, input, missing);
    if (!spanning.length) continue;
    out.push(
      (c.note ? note : warning)(
        AUDIT_CODE['split-groups'],
        `column "${c.name}" (${c.why}) has ${plural(repeated, 'value')} shared by several rows, of ${groups}; ` +
          `${spanning.length} of them have rows in both training and test (${listed(spanning.map((v) => `"${v}"`))}), ` +
          `because the split does not keep them together`,
        {
          ...c.at,
          hint:
            p.data.group === c.name
              ? 'split with grouped-kfold (or another rule that keeps groups), so each group is tested on a model that never saw it'
              : `set data.group: ${c.name} and split with grouped-kfold, so each ${c.name} is tested on a model that never saw it`,
        },
      ),
    );
  }
  return out;
}
