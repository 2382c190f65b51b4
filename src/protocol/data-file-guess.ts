/**
 * A quick guess at a protocol's data file from its text, before the YAML library is loaded: the
 * first `file:` inside the top-level `data:` mapping, written block or flow style, plain or
 * quoted without escapes. Undefined when the text does not look like that. Only a hint for
 * starting work early: the protocol is parsed and checked as always. Pure.
 */
export function dataFileGuess(text: string): string | undefined {
  const lines = text.split(/\r?\n/);
  const start = lines.findIndex((line) => /^data\s*:/.test(line));
  if (start < 0) return undefined;
  // The mapping runs to the next line that starts at the left margin (another top-level key).
  let end = start + 1;
  while (end < lines.length && !/^[^\s#]/.test(lines[end])) end++;
  const section = lines.slice(start, end).join('\n');
  const match = /(?:^|[\s{,])file\s*:\s*(?:"([^"\\\n]+)"|'([^'\n]+)'|([^\s,{}[\]#"'][^\s,{}[\]#]*))/.exec(
    section.slice(section.indexOf(':') + 1),
  );
  return match ? (match[1] ?? match[2] ?? match[3]) : undefined;
}
