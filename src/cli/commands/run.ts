import { resolve } from 'node:path';
import { hasErrors } from '../../problems/problem.js';
import { writeOutputDir } from '../../io/output-dir.js';
import { shown, validateProtocol } from '../../io/validate.js';
import { runProtocol } from '../../run/run.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems } from '../report-problems.js';
import { cvTables } from '../cv-table.js';
import { disagreementReport } from '../../reconcile/applied.js';

export interface RunArgs {
  protocol: string;
  out?: string;
  force?: boolean;
  refit?: boolean;
}

export async function runCommand(args: RunArgs, io: CommandIo): Promise<ExitCode> {
  const report = await validateProtocol(args.protocol);
  reportProblems(io, report.problems, 'text');
  if (report.unreadable) return 2;
  if (hasErrors(report.problems) || !report.protocol || !report.table || !report.assignment) return 1;
  const p = report.protocol;
  const dir = resolve(args.out ?? `results/${p.name}`);
  const started = Date.now();
  let lastShown = 0;
  const out = runProtocol(
    { protocol: p, raw: report.raw, newRows: report.newRows, refit: args.refit, protocolFile: report.file, table: report.table, dataSha256: report.dataSha256!, assignment: report.assignment, warnings: report.problems.filter((q) => q.severity === 'warning') },
    {
      onFold: (done, total) => {
        // Progress only for a person at a terminal, and only once the run has taken a while.
        const now = Date.now();
        if (io.errIsTty && now - started > 1500 && now - lastShown > 200) { io.err(`\rfitting fold ${done}/${total}`); lastShown = now; }
      },
    },
  );
  if (lastShown) io.err('\r\x1b[K');
  reportProblems(io, out.cv.warnings, 'text');
  await writeOutputDir(dir, out.files, Boolean(args.force), shown(dir));
  io.out(cvTables(out.cv));
  if (out.applied) io.out('\nnew rows (reconcile: ' + p.reconcile.rule + '):\n' + disagreementReport(out.applied, out.cv.classes));
  io.out(`wrote ${Object.keys(out.files).sort().join(', ')} to ${shown(dir)}\n`);
  return 0;
}
