/**
 * docs/protocol.md is generated from schema/protocol.schema.json, so the schema stays the
 * single source of every field's description (editors show the same text through the modeline).
 */
type Schema = Record<string, any>;

const HEADER = `# Protocol format v1 — field reference

Generated from \`schema/protocol.schema.json\` by \`npm run docs\`; do not edit by hand. The same
descriptions appear in editors that read the modeline
\`# yaml-language-server: $schema=…/schema/protocol.schema.json\`.

Paths (\`data.file\`, \`split.pinned.file\`, \`reconcile.new-rows.file\`) are relative to the protocol
file. Every mapping rejects keys it does not list. Defaults apply when a field is left out.
`;

export function protocolReference(schema: Schema): string {
  const lines: string[] = [HEADER];
  walk(schema, '', lines, schema.required ?? []);
  lines.push('', '## Model options by kind', '');
  for (const branch of schema.properties.model.allOf as Schema[]) {
    const kind = branch.if.properties.kind.const as string;
    const opts = branch.then.properties.options.properties as Record<string, Schema> | undefined;
    lines.push(`### \`${kind}\``, '');
    if (!opts) {
      lines.push('`model.command` names the program (above); `model.options` go to it as written (docs/command-models.md).', '');
      continue;
    }
    for (const [name, s] of Object.entries(opts))
      lines.push(
        `- \`model.options.${name}\` (${typeOf(s)}${'default' in s ? `, default \`${JSON.stringify(s.default)}\`` : ''}): ${s.description}`,
      );
    lines.push('');
  }
  return (
    lines
      .join('\n')
      .replace(/\n{3,}/g, '\n\n')
      .trimEnd() + '\n'
  );
}

function walk(s: Schema, path: string, lines: string[], required: string[]): void {
  for (const [name, child] of Object.entries((s.properties ?? {}) as Record<string, Schema>)) {
    const full = path ? `${path}.${name}` : name;
    const facts = [typeOf(child), required.includes(name) ? 'required' : 'optional'];
    if ('default' in child) facts.push(`default \`${JSON.stringify(child.default)}\``);
    lines.push(`${path ? '-' : '##'} \`${full}\` (${facts.join(', ')})${path ? ':' : ''} ${path ? child.description : ''}`.trimEnd());
    if (!path) lines.push('', child.description, '');
    if (child.enum) lines.push(`${path ? '  ' : ''}Values: ${child.enum.map((v: string) => `\`${v}\``).join(', ')}.`);
    if (child.type === 'object' && child.properties && name !== 'model') walk(child, full, lines, child.required ?? []);
    if (child.items?.enum) lines.push(`${path ? '  ' : ''}Items: ${child.items.enum.map((v: string) => `\`${v}\``).join(', ')}.`);
    if (child.items?.oneOf) for (const b of child.items.oneOf as Schema[]) lines.push(`- ${describeBranch(b)}`);
    if (name === 'model') walk(child, full, lines, child.required ?? []);
    if (!path) lines.push('');
  }
}

function describeBranch(b: Schema): string {
  if (b.enum) return `${b.enum.map((v: string) => `\`${v}\``).join(' or ')} — ${b.description}`;
  const key = b.required[0] as string;
  const inner = b.properties[key] as Schema;
  const fields = Object.entries(inner.properties as Record<string, Schema>).map(([k, v]) => {
    const values = v.enum ?? v.oneOf?.[0]?.enum;
    return `\`${k}\`${values ? ` (${values.join(' | ')})` : ''}: ${v.description}`;
  });
  return `\`{${key}: {…}}\` — ${b.description} ${fields.join('; ')}`;
}

function typeOf(s: Schema): string {
  if (s.const !== undefined) return `constant \`${s.const}\``;
  if (s.enum) return 'one of the values below';
  if (s.oneOf) return s.oneOf.map((b: Schema) => b.type ?? 'value').join(' or ');
  return s.type ?? 'value';
}
