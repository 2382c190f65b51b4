import type { Protocol } from './types.js';

/** Columns a protocol accounts for without using them as features: label, group and exclusions. */
export function knownColumns(p: Protocol): string[] {
  const excluded = p.data.features && !Array.isArray(p.data.features) ? p.data.features.exclude : [];
  return [p.data.label, ...(p.data.group ? [p.data.group] : []), ...excluded];
}
