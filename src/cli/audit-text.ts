/** The audit's verdict and its selection-bias demonstration, as words. */
import type { AuditResult } from '../audit/audit.js';
import type { SelectionBias } from '../audit/selection-bias.js';
import { countSummary, type Problem } from '../problems/index.js';

const value = (v: number | null) => (v === null ? 'undefined' : v.toFixed(3));

export function selectionBiasText(s: SelectionBias): string {
  const diff = s.honest.mean !== null && s.careless.mean !== null ? s.careless.mean - s.honest.mean : null;
  const optimism = diff === null ? '' : `   (${diff >= 0 ? '+' : '−'}${Math.abs(diff).toFixed(3)})`;
  return [
    `selection bias, ${s.metric} (mean over folds; pooled in brackets):`,
    `  selected inside each fold (what foldseal reports)  ${value(s.honest.mean)}  [${value(s.honest.pooled)}]`,
    `  selected once on all rows, then cross-validated    ${value(s.careless.mean)}  [${value(s.careless.pooled)}]${optimism}`,
    `  (${s.selectedOnAll} features kept when selecting on all rows; the second line is what a careless analysis would report)`,
    ...(s.fixedAt
      ? [
          `  (untuned on both lines: ${Object.entries(s.fixedAt)
            .map(([k, v]) => `${k} = ${v}`)
            .join(', ')}, each tuned setting's first listed value)`,
        ]
      : []),
  ].join('\n');
}

export function auditVerdict(file: string, result: AuditResult): string {
  const leaks = result.findings.filter((p) => p.severity === 'warning').length;
  const skipped = result.skipped.length ? `; not run for a table this size: ${result.skipped.join(', ')} (see docs/audit.md)` : '';
  return `${file}: ${leaks ? 'possible leaks' : 'no leak found'} (${countSummary(result.findings)})${skipped}`;
}

/** The one line `run` prints: the audit's counts by kind, and where to see the findings. */
export function auditLine(protocol: string, result: AuditResult): string {
  const findings = result.findings;
  const kinds = (severity: Problem['severity']) => [
    ...new Set(findings.filter((p) => p.severity === severity).map((p) => p.code.replace(/^audit-/, ''))),
  ];
  const warned = kinds('warning');
  const noted = kinds('note');
  const parts = [
    warned.length ? `possible leaks: ${warned.join(', ')}` : 'no leak found',
    ...(noted.length ? [`notes: ${noted.join(', ')}`] : []),
  ];
  const more = result.skipped.length ? `; left out for this size: ${result.skipped.join(', ')}` : '';
  const see =
    findings.length || result.skipped.length
      ? ` — foldseal audit ${protocol} ${findings.length ? 'shows where' : 'runs the full audit'}`
      : '';
  return `\naudit: ${parts.join('; ')}${more}${see}`;
}
