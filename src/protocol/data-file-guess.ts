/**
 * A quick guess at a protocol's data file from its text, before the YAML library is loaded: the
 * first `file:` inside the top-level `data:` mapping, written block or flow style, plain or
 * quoted without escapes; and whether the mapping looks like a plain samples-in-rows table read
 * as it is: none of `samples`, `where`, `classes`, nor a `layout` other than samples-in-rows
 * (those are read whole, never in stretches). Undefined when the text does not look like that.
 * Only a hint for starting work early: the protocol is parsed and checked as always. Pure.
 */
export function dataSectionGuess(text: string): { file: string; plain: boolean } | undefined {
  const lines = text.split(/\r?\n/);
  const start = lines.findIndex((line) => /^data\s*:/.test(line));
  if (start < 0) return undefined;
  // The mapping runs to the next line that starts at the left margin (another top-level key).
  let end = start + 1;
  while (end < lines.length && !/^[^\s#]/.test(lines[end])) end++;
  const section = lines.slice(start, end).join('\n');
  const body = section.slice(section.indexOf(':') + 1);
  const match = /(?:^|[\s{,])file\s*:\s*(?:"([^"\\\n]+)"|'([^'\n]+)'|([^\s,{}[\]#"'][^\s,{}[\]#]*))/.exec(body);
  if (!match) return undefined;
  const layout = /(?:^|[\s{,])layout\s*:\s*["']?([\w-]+)/.exec(body)?.[1];
  const plain = !/(?:^|[\s{,])(?:samples|where|classes)\s*:/.test(body) && (layout === undefined || layout === 'samples-in-rows');
  return { file: match[1] ?? match[2] ?? match[3], plain };
}
