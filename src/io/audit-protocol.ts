/** The shell around the audit: validates a protocol with its non-feature columns described, then audits it. */
import { audit, type AuditOptions, type AuditResult } from '../audit/audit.js';
import { locate } from '../protocol/document.js';
import type { ValidationReport } from '../protocol/report.js';
import type { PathPolicy } from './path-policy.js';
import { validateProtocol } from './validate.js';
import { hasErrors } from '../problems/problem.js';

export interface AuditedProtocol {
  report: ValidationReport;
  /** Absent when the protocol or its data has errors (they are in report.problems). */
  result?: AuditResult;
}

export async function auditProtocol(path: string, access: PathPolicy, options: AuditOptions = {}): Promise<AuditedProtocol> {
  const report = await validateProtocol(path, { access, describe: true });
  return { report, result: auditReport(report, options) };
}

/** The audit of a validated protocol; undefined when it has errors or was validated without `describe`. */
export function auditReport(report: ValidationReport, options: AuditOptions = {}): AuditResult | undefined {
  if (hasErrors(report.problems) || !report.protocol || !report.table || !report.assignment || !report.described) return undefined;
  const source = report.source!;
  return audit(
    {
      protocol: report.protocol,
      table: report.table,
      assignment: report.assignment,
      described: report.described,
      protocolAt: (docPath) => ({ file: report.file, path: docPath, position: locate(source, docPath) }),
    },
    options,
  );
}
