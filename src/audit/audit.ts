/** The leakage audit: every check over one validated protocol and its data → findings and the selection-bias demonstration. Pure. */
import type { Problem } from '../problems/problem.js';
import { confoundingFindings } from './confounding.js';
import { duplicateFindings, nearSearched } from './duplicates.js';
import { groupFindings } from './groups.js';
import type { AuditInput } from './input.js';
import { idFindings, proxyFindings } from './separation.js';
import { selectionBias, type SelectionBias } from './selection-bias.js';
import { AUDIT_THRESHOLDS } from './thresholds.js';

export interface AuditResult {
  findings: Problem[];
  /** Checks not run for the size of this table (near duplicates above their work budget; label proxies in the quick audit). */
  skipped: string[];
  /** Absent when not asked for, or when the pipeline selects no features. */
  selectionBias?: SelectionBias;
}

export interface AuditOptions {
  /** Also run the selection-bias demonstration (two cross-validations). */
  selectionBias?: boolean;
  /** `run`'s audit: leave out the per-feature separation check above AUDIT_THRESHOLDS.quickMaxCells, near duplicates above quickNearWork. */
  quick?: boolean;
}

export function audit(input: AuditInput, options: AuditOptions = {}): AuditResult {
  const { rows, cols } = input.table.X;
  const skipProxy = Boolean(options.quick) && rows * cols > AUDIT_THRESHOLDS.quickMaxCells;
  const nearBudget = options.quick ? AUDIT_THRESHOLDS.quickNearWork : AUDIT_THRESHOLDS.nearMaxWork;
  const findings = [
    ...duplicateFindings(input, nearBudget),
    ...groupFindings(input),
    ...(skipProxy ? [] : proxyFindings(input)),
    ...idFindings(input),
    ...confoundingFindings(input),
  ];
  return {
    findings,
    skipped: [
      ...(cols >= AUDIT_THRESHOLDS.nearMinFeatures && !nearSearched(rows, cols, nearBudget) ? ['near-duplicates'] : []),
      ...(skipProxy ? ['label-proxy'] : []),
    ],
    selectionBias: options.selectionBias ? selectionBias(input) : undefined,
  };
}
