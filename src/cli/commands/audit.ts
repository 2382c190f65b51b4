import { auditProtocol } from '../../io/audit-protocol.js';
import { protocolPolicy } from '../../io/path-policy.js';
import { AUDIT_THRESHOLDS } from '../../audit/thresholds.js';
import { FoldsealError, hasErrors, problemsAsJson } from '../../problems/index.js';
import { auditVerdict, selectionBiasText } from '../audit-text.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems, type OutputFormat } from '../report-problems.js';

export interface AuditArgs {
  protocol: string;
  format: OutputFormat;
  allowOutside?: boolean;
  /** false with --no-selection-bias: skip the two extra cross-validations. */
  selectionBias?: boolean;
}

/** Exit 0: no warning-level finding (notes only); 1: possible leaks, or the protocol is invalid; 2: unreadable. */
export async function auditCommand(args: AuditArgs, io: CommandIo): Promise<ExitCode> {
  const { report, result } = await auditProtocol(args.protocol, protocolPolicy(args.protocol, Boolean(args.allowOutside)), {
    selectionBias: args.selectionBias !== false,
  });
  if (report.unreadable) throw new FoldsealError(report.problems, 2);
  if (!result) {
    reportProblems(io, report.problems, args.format);
    return hasErrors(report.problems) ? 1 : 2;
  }
  const findings = result.findings;
  if (args.format === 'json') {
    io.out(
      JSON.stringify(
        {
          protocol: report.file,
          findings: problemsAsJson(findings),
          skipped: result.skipped,
          selectionBias: result.selectionBias ?? null,
          thresholds: AUDIT_THRESHOLDS,
        },
        null,
        2,
      ) + '\n',
    );
  } else {
    reportProblems(io, findings, 'text');
    if (result.selectionBias) io.out(selectionBiasText(result.selectionBias) + '\n');
    io.err(auditVerdict(report.file, result) + '\n');
  }
  return findings.some((p) => p.severity === 'warning') ? 1 : 0;
}
