/**
 * The deepest bracket nesting of a JSON or flow-style YAML text, outside quoted strings, so a
 * document nested thousands of levels deep is refused with a clear message before a parser or
 * schema check recurses into it. Pure.
 */
export const MAX_NESTING = 64;

export function nestingDepth(text: string, stopAbove = Infinity): { depth: number; offset: number } {
  let depth = 0;
  let deepest = 0;
  let at = 0;
  let quote = '';
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (quote) {
      if (quote === '"' && ch === '\\') {
        i++;
        continue;
      }
      if (ch === quote) {
        // YAML single quotes escape themselves by doubling.
        if (quote === "'" && text[i + 1] === "'") {
          i++;
          continue;
        }
        quote = '';
      }
      continue;
    }
    if (ch === '"' || (ch === "'" && /[\s[{,:]/.test(text[i - 1] ?? ' '))) quote = ch;
    else if (ch === '#' && /\s/.test(text[i - 1] ?? '\n')) {
      const nl = text.indexOf('\n', i);
      i = nl < 0 ? text.length : nl;
    } else if (ch === '[' || ch === '{') {
      depth++;
      if (depth > deepest) {
        deepest = depth;
        at = i;
        if (deepest > stopAbove) break;
      }
    } else if (ch === ']' || ch === '}') depth = Math.max(0, depth - 1);
  }
  return { depth: deepest, offset: at };
}
