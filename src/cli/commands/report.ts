import { join, resolve } from 'node:path';
import { auditProtocol } from '../../io/audit-protocol.js';
import { writeOutputFile } from '../../io/output-file.js';
import { protocolPolicy } from '../../io/path-policy.js';
import { buildReport } from '../../io/report.js';
import { readResults } from '../../io/results-dir.js';
import { shown } from '../../io/validate.js';
import { canonicalSha256 } from '../../manifest/canonical.js';
import { error, FoldsealError, hasErrors } from '../../problems/index.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems } from '../report-problems.js';
import { toolInfo } from '../tool-info.js';
import { checkBrowser, printPdf } from '../../io/pdf.js';
import type { AuditResult } from '../../audit/audit.js';

export interface ReportArgs {
  results: string;
  out?: string;
  force?: boolean;
  /** Print only the methods paragraph. */
  methods?: boolean;
  /** The protocol the results came from: its data are audited for the report (its hash must match the results'). */
  protocol?: string;
  allowOutside?: boolean;
  /** Also print the page to this PDF through a headless Chromium. */
  pdf?: string;
  /** The Chromium (or Chrome) binary for --pdf. */
  browser?: string;
}

/** The audit of the protocol that produced `results` (refused when it is another protocol). */
async function auditFor(args: ReportArgs, io: CommandIo): Promise<AuditResult | undefined> {
  if (!args.protocol) return undefined;
  const results = await readResults(args.results);
  const { report, result } = await auditProtocol(args.protocol, protocolPolicy(args.protocol, Boolean(args.allowOutside)), {
    selectionBias: false,
  });
  if (report.unreadable || hasErrors(report.problems) || !result) {
    reportProblems(io, report.problems, 'text');
    throw new FoldsealError(error('bad-option', `--protocol ${args.protocol} cannot be audited`), report.unreadable ? 2 : 1);
  }
  if (canonicalSha256(report.raw) !== results.protocol.sha256)
    throw new FoldsealError(
      error('bad-option', `--protocol ${args.protocol} is not the protocol these results were run from (its SHA-256 differs)`, {
        hint: 'give the protocol file the run used, unchanged',
      }),
      2,
    );
  return result;
}

export async function reportCommand(args: ReportArgs, io: CommandIo, given?: { audit?: AuditResult }): Promise<ExitCode> {
  if (args.pdf) checkBrowser(args.browser ?? '/usr/bin/chromium');
  const audit = given?.audit ?? (await auditFor(args, io));
  const built = await buildReport(args.results, { audit, toolVersion: toolInfo().version });
  if (args.methods) {
    io.out(built.methods + '\n');
    return 0;
  }
  const out = resolve(args.out ?? join(args.results, 'report.html'));
  await writeOutputFile(out, built.html, shown(out), Boolean(args.force));
  io.out(`wrote ${shown(out)}\n`);
  if (args.pdf) {
    const pdf = resolve(args.pdf);
    await writeOutputFile(pdf, await printPdf(out, args.browser ?? '/usr/bin/chromium'), shown(pdf), Boolean(args.force));
    io.out(`wrote ${shown(pdf)}\n`);
  }
  return 0;
}
