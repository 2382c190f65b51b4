/** Plain aligned text tables for terminal summaries (numbers right-aligned). */
export function textTable(header: string[], rows: string[][]): string {
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => (r[c] ?? '').length)));
  const numeric = header.map((_, c) => rows.length > 0 && rows.every((r) => /^-?[\d.]+%?$|^—$/.test(r[c] ?? '')));
  const line = (cells: string[]) =>
    cells
      .map((v, c) => (numeric[c] ? v.padStart(widths[c]) : v.padEnd(widths[c])))
      .join('  ')
      .trimEnd();
  return [line(header), widths.map((w) => '─'.repeat(w)).join('  '), ...rows.map(line)].join('\n') + '\n';
}
