/** The kinds of audit finding: their problem codes and the names a lock's policy.forbid-leaks lists. */
export const AUDIT_KINDS = ['duplicates', 'near-duplicates', 'split-groups', 'label-proxy', 'id-label', 'confounded'] as const;
export type AuditKind = (typeof AUDIT_KINDS)[number];

export const AUDIT_CODE = {
  duplicates: 'audit-duplicates',
  'near-duplicates': 'audit-near-duplicates',
  'split-groups': 'audit-split-groups',
  'label-proxy': 'audit-label-proxy',
  'id-label': 'audit-id-label',
  confounded: 'audit-confounded',
} as const satisfies Record<AuditKind, string>;

export function kindOfCode(code: string): AuditKind | undefined {
  return AUDIT_KINDS.find((k) => AUDIT_CODE[k] === code);
}
