/**
 * YAML parsing that keeps source positions, so every later problem can point
 * at the node it concerns.
 */
import { isMap, isPair, isScalar, isSeq, LineCounter, parseDocument, type Document, type Node, type Pair } from 'yaml';
import { error, type Position, type Problem } from '../problems/problem.js';
import { MAX_NESTING, nestingDepth } from '../util/nesting.js';

export interface SourceDocument {
  file: string;
  text: string;
  doc: Document.Parsed;
  lines: LineCounter;
}

export type DocPath = readonly (string | number)[];

export interface ParsedYaml {
  source: SourceDocument;
  value: unknown;
  problems: Problem[];
}

/** The yaml package's default alias budget stays on; an alias bomb is a located error. */
const MAX_ALIAS_COUNT = 100;

export function parseYaml(text: string, file: string): ParsedYaml {
  const nested = nestingDepth(text, MAX_NESTING);
  if (nested.depth > MAX_NESTING) {
    const before = text.slice(0, nested.offset);
    const line = before.split('\n').length;
    const source: SourceDocument = { file, text, doc: parseDocument(''), lines: new LineCounter() };
    return {
      source,
      value: undefined,
      problems: [
        error(
          'yaml-too-deep',
          `brackets nest more than ${MAX_NESTING} levels deep here; foldseal refuses such documents (a resource-exhaustion guard)`,
          { file, position: { line, col: nested.offset - before.lastIndexOf('\n') } },
        ),
      ],
    };
  }
  const lines = new LineCounter();
  const doc = parseDocument(text, { lineCounter: lines, prettyErrors: false, uniqueKeys: true, strict: true });
  const source: SourceDocument = { file, text, doc, lines };
  const problems: Problem[] = [];
  for (const e of doc.errors) {
    const pos = lines.linePos(e.pos[0]);
    const duplicate = e.code === 'DUPLICATE_KEY';
    problems.push(
      error(
        duplicate ? 'yaml-duplicate-key' : 'yaml-syntax',
        duplicate ? `key ${keyAt(text, e.pos[0])}appears twice in the same mapping` : firstLine(e.message),
        { file, position: { line: pos.line, col: pos.col } },
      ),
    );
  }
  for (const w of doc.warnings) {
    const pos = lines.linePos(w.pos[0]);
    problems.push({
      code: 'yaml-warning',
      severity: 'warning',
      message: firstLine(w.message),
      file,
      position: { line: pos.line, col: pos.col },
    });
  }
  if (problems.some((p) => p.severity === 'error')) return { source, value: undefined, problems };
  let value: unknown;
  try {
    value = doc.toJS({ maxAliasCount: MAX_ALIAS_COUNT });
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    if (/^Unresolved alias/i.test(message)) {
      const name = /: ([^\s:]+)$/.exec(message)?.[1];
      problems.push(
        error(
          'yaml-undefined-alias',
          `the alias ${name ? `*${name}` : ''} refers to an anchor that is not defined earlier in the document`.replace(
            'alias  ',
            'alias ',
          ),
          { file, position: firstAliasPosition(source), hint: name ? `define it first with &${name}, or write the value out` : undefined },
        ),
      );
    } else if (/alias/i.test(message)) {
      problems.push(
        error('yaml-alias-limit', `aliases expand past the limit of ${MAX_ALIAS_COUNT} (a resource-exhaustion guard)`, {
          file,
          position: firstAliasPosition(source),
        }),
      );
    } else throw e;
  }
  return { source, value, problems };
}

function keyAt(text: string, offset: number): string {
  const m = /^\s*([^:\n]+?)\s*:/.exec(text.slice(offset, offset + 200));
  return m ? `"${m[1]}" ` : '';
}

function firstLine(message: string): string {
  return message.split('\n')[0].replace(/ at line \d+, column \d+:?$/, '');
}

function firstAliasPosition(source: SourceDocument): Position | undefined {
  const m = /(^|[\s[{,])\*[^\s,\]}]/m.exec(source.text);
  return m ? offsetPosition(source, m.index + m[1].length) : undefined;
}

export function offsetPosition(source: SourceDocument, offset: number): Position {
  const p = source.lines.linePos(offset);
  return { line: p.line, col: p.col };
}

/** Position of the value at `path`, or of the deepest existing ancestor. With `key`, the mapping key itself. */
export function locate(source: SourceDocument, path: DocPath, key = false): Position | undefined {
  let node: unknown = source.doc.contents;
  let keyNode: Node | undefined;
  let last: unknown = node;
  for (const step of path) {
    if (isMap(node)) {
      const pair = node.items.find((p: Pair) => isScalar(p.key) && String(p.key.value) === String(step));
      if (!pair) break;
      keyNode = pair.key as Node;
      node = pair.value;
    } else if (isSeq(node) && typeof step === 'number') {
      node = node.items[step];
      keyNode = undefined;
    } else break;
    if (node === null || node === undefined) {
      node = keyNode;
      break;
    }
    last = node;
  }
  const target = (key && keyNode ? keyNode : (node ?? last)) as Node | undefined;
  const range = target && (target as Node).range;
  return range ? offsetPosition(source, range[0]) : { line: 1, col: 1 };
}

/** Whether a mapping at `path` has `key`, as written (before defaults). */
export function hasKey(source: SourceDocument, path: DocPath, keyName: string): boolean {
  const node = path.length === 0 ? source.doc.contents : source.doc.getIn(path, true);
  return isMap(node) && node.items.some((p) => isPair(p) && isScalar(p.key) && String(p.key.value) === keyName);
}
