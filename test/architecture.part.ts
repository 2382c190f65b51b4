/**
 * The layering of DEVELOPERS.md, enforced: a functional core (every folder of src/ but cli/ and
 * io/) that touches no file, process, environment, clock or thread, and never imports the shell;
 * io/ never imports cli/; no import cycle between folders.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import t from 'tap';
import { root } from './helpers.js';

const src = join(root, 'src');
function files(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? files(join(dir, e.name)) : e.name.endsWith('.ts') ? [join(dir, e.name)] : [],
  );
}
const folderOf = (file: string) => {
  const rel = relative(src, file).split('/');
  return rel.length > 1 ? rel[0] : '(entry)';
};
const SHELL = new Set(['cli', 'io', '(entry)']);
const IMPURE_MODULES = /^node:(fs|fs\/promises|child_process|worker_threads|net|os|module|readline|http|https)$/;
const IMPURE_CALLS = /\bprocess\.(env|cwd|exit|argv|stdout|stderr|pid|kill)\b|\bDate\.now\(|\bnew Date\(|\bperformance\.now\(/;

const edges = new Map<string, Set<string>>();
const problems: string[] = [];
for (const file of files(src)) {
  const text = readFileSync(file, 'utf8');
  const folder = folderOf(file);
  const code = text.replace(/\/\*[\s\S]*?\*\//g, '').replace(/^\s*\/\/.*$/gm, '');
  for (const m of code.matchAll(/(?:from|import\()\s*'([^']+)'/g)) {
    const spec = m[1];
    if (spec.startsWith('.')) {
      const target = folderOf(join(file, '..', spec));
      if (target !== folder) {
        if (!edges.has(folder)) edges.set(folder, new Set());
        edges.get(folder)!.add(target);
      }
      if (!SHELL.has(folder) && (target === 'cli' || target === 'io')) problems.push(`${relative(root, file)} (core) imports ${spec}`);
      if (folder === 'io' && target === 'cli') problems.push(`${relative(root, file)} (io) imports ${spec}`);
    } else if (!SHELL.has(folder) && IMPURE_MODULES.test(spec)) problems.push(`${relative(root, file)} (core) imports ${spec}`);
  }
  if (!SHELL.has(folder) && IMPURE_CALLS.test(code)) problems.push(`${relative(root, file)} (core) uses ${IMPURE_CALLS.exec(code)![0]}`);
}

t.test('the core touches no file, process, environment, clock or thread, and imports no shell module', async (t) => {
  t.same(problems, []);
});

t.test('no import cycle between folders', async (t) => {
  const cycles: string[] = [];
  const visit = (start: string, at: string, path: string[]) => {
    for (const next of edges.get(at) ?? []) {
      if (next === start) cycles.push([...path, next].join(' → '));
      else if (!path.includes(next) && next > start) visit(start, next, [...path, next]);
    }
  };
  for (const folder of edges.keys()) visit(folder, folder, [folder]);
  t.same(cycles, []);
});

t.test('every code of the problem catalogue is used, and every code used is in it (the compiler checks the second)', async (t) => {
  const catalogue = readFileSync(join(src, 'problems', 'codes.ts'), 'utf8');
  const codes = [...catalogue.matchAll(/^ {2}'([a-z0-9-]+)':/gm)].map((m) => m[1]);
  t.ok(codes.length > 100, `${codes.length} codes`);
  const rest = files(src)
    .filter((f) => !f.endsWith('codes.ts'))
    .map((f) => readFileSync(f, 'utf8'))
    .join('\n');
  t.same(
    codes.filter((c) => !rest.includes(`'${c}'`)),
    [],
    'no code only in the catalogue',
  );
});
