import { resolve } from 'node:path';
import { writeOutputFile } from '../../io/output-file.js';
import { protocolPolicy } from '../../io/path-policy.js';
import { error, hasErrors } from '../../problems/problem.js';
import { shown, validateProtocol } from '../../io/validate.js';
import { testsFoldOneOnly } from '../../protocol/types.js';
import { assignmentCsv } from '../../split/csv.js';
import { foldCounts, sizeSpread } from '../../split/summary.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems } from '../report-problems.js';
import { textTable } from '../text-table.js';
import { planFolds } from '../../run/cross-validate.js';
import { innerAssignmentsCsv } from '../../run/nested.js';

export async function foldsCommand(
  args: { protocol: string; out?: string; allowOutside?: boolean; inner?: boolean },
  io: CommandIo,
): Promise<ExitCode> {
  const report = await validateProtocol(args.protocol, { access: protocolPolicy(args.protocol, Boolean(args.allowOutside)) });
  reportProblems(io, report.problems, 'text');
  if (report.unreadable) return 2;
  if (hasErrors(report.problems) || !report.assignment || !report.table || !report.protocol) return 1;
  const a = report.assignment;
  const t = report.table;
  const p = report.protocol;
  if (args.inner && !p.tune) {
    const why = '--inner writes the inner splits of a tune section, and this protocol has none';
    reportProblems(io, [error('no-tune', why, { file: report.file, hint: 'see `tune` in docs/protocol.md' })], 'text');
    return 1;
  }
  const csv = args.inner ? innerAssignmentsCsv(p.tune!.split, t, planFolds(p, t, a)) : assignmentCsv(a);
  if (args.out) await writeOutputFile(resolve(args.out), csv, shown(resolve(args.out)), true);
  else io.out(csv);
  if (args.inner) {
    io.err(`${a.version} §9: inner ${p.tune!.split.rule} splits of ${planFolds(p, t, a).length} outer training parts\n`);
    if (args.out) io.err(`wrote ${args.out}\n`);
    return 0;
  }
  const counts = foldCounts(a, t.y, t.classes.length);
  const header = ['repeat', 'fold', 'rows', ...t.classes.map((c) => `n[${c}]`)];
  const holdout = testsFoldOneOnly(report.protocol);
  const rows = counts.map((c) => [
    String(c.repeat),
    holdout ? (c.fold === 1 ? 'test' : 'train') : String(c.fold),
    String(c.rows),
    ...c.perClass.map(String),
  ]);
  io.err(`${a.version}: ${a.ids.length} ids, ${a.repeats} repeat${a.repeats === 1 ? '' : 's'}, ${a.folds} folds\n`);
  if (a.folds <= 50) io.err(textTable(header, rows));
  const spread = sizeSpread(counts);
  if (!holdout) io.err(`fold sizes: ${spread.min} to ${spread.max} rows\n`);
  if (args.out) io.err(`wrote ${args.out}\n`);
  return 0;
}
