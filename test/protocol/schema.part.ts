import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import Module from 'node:module';
import { join } from 'node:path';
import { Script } from 'node:vm';
import t from 'tap';
import { protocolReference } from '../../src/protocol/reference-doc.js';
import { parse } from 'yaml';
import { compileValidator, precompiledValidator, readSchema, requireCached } from '../../src/io/schemas.js';
import { root, tempDir } from '../helpers.js';

type S = Record<string, any>;
const schema = readSchema('protocol.schema.json');

function objects(s: S, path: string, out: [string, S][]): [string, S][] {
  if (s && typeof s === 'object') {
    if (s.type === 'object' && s.properties) out.push([path, s]);
    for (const [k, v] of Object.entries(s)) if (v && typeof v === 'object') objects(v as S, `${path}/${k}`, out);
  }
  return out;
}

t.test('the protocol schema is draft 2020-12 with an $id', async (t) => {
  t.equal(schema.$schema, 'https://json-schema.org/draft/2020-12/schema');
  t.match(schema.$id as string, /^https:\/\//);
});

t.test('every mapping is closed and every property has a description', async (t) => {
  for (const [path, s] of objects(schema, '#', [])) {
    t.equal(s.additionalProperties, false, `${path} closes additionalProperties`);
    for (const [name, p] of Object.entries(s.properties as Record<string, S>))
      t.ok(typeof p.description === 'string' && p.description.length > 10, `${path}/${name} has a description`);
  }
});

t.test('docs/protocol.md is generated from the schema and up to date (npm run docs)', async (t) => {
  t.equal(readFileSync(join(root, 'docs', 'protocol.md'), 'utf8'), protocolReference(schema));
});

// The build's standalone validators are Ajv's own code generation for the same schema and
// options: they must report exactly what a validator compiled at run time reports.
t.test('precompiled validators report exactly what freshly compiled ones do', async (t) => {
  const documents: unknown[] = [
    parse(readFileSync(join(root, 'protocols', 'demo.yaml'), 'utf8')),
    {
      foldseal: 1,
      name: 'x',
      data: { file: 'd.csv', sha256: 'zz', label: 3 },
      split: { rule: 'kfold', folds: 1 },
      model: { kind: 'gaussian-nbb' },
      metrics: ['acc'],
      extra: true,
    },
    { foldseal: 2 },
    [],
    { 'foldseal-manifest': 1, tool: { name: 'foldseal' } },
  ];
  for (const name of ['protocol.schema.json', 'manifest.schema.json']) {
    const built = precompiledValidator(name);
    t.ok(built, `${name} was precompiled by the build`);
    const fresh = compileValidator(name);
    for (const d of documents) {
      const a = built!(d);
      const b = fresh(d);
      t.equal(a, b, `${name}: same verdict`);
      t.same(JSON.parse(JSON.stringify(built!.errors ?? null)), JSON.parse(JSON.stringify(fresh.errors ?? null)), `${name}: same errors`);
    }
  }
});

t.test('a module loads the same with its code cache, with a cache V8 refuses, and without one', async (t) => {
  const code = "const base = require('node:path').basename(__filename);\nmodule.exports = { base, twice: (x) => 2 * x };\n";
  const dir = tempDir({ 'm.cjs': code });
  const file = join(dir, 'm.cjs');
  const load = () => requireCached(file) as { base: string; twice: (x: number) => number };
  const expect = (what: string) => {
    const m = load();
    t.equal(m.base, 'm.cjs', `${what}: its own __filename`);
    t.equal(m.twice(21), 42, what);
  };
  expect('no cache');
  writeFileSync(join(dir, 'm.v8cache'), 'not a code cache');
  expect('a cache V8 refuses');
  const script = new Script(Module.wrap(code), { filename: file });
  writeFileSync(join(dir, 'm.v8cache'), script.createCachedData());
  expect('its own cache');
});

// V8 takes a code cache only under the flags it was made with; the command line sets its heap
// flags first thing, so the build makes the validators' caches under the same ones. A cache made
// under other flags is silently compiled afresh, which this catches (it once cost every run ~20 ms).
t.test("the build's validator caches are accepted under the command line's flags", async (t) => {
  const flags = new URL('../../src/io/heap-flags.js', import.meta.url).href;
  for (const name of ['protocol', 'manifest']) {
    const file = join(root, 'dist', 'validators', `${name}.schema.cjs`);
    const script = [
      `import { CLI_HEAP_FLAGS, useHeapFlags } from ${JSON.stringify(flags)};`,
      "import { readFileSync } from 'node:fs'; import Module from 'node:module'; import { Script } from 'node:vm';",
      'useHeapFlags(CLI_HEAP_FLAGS);',
      `const file = ${JSON.stringify(file)};`,
      "const s = new Script(Module.wrap(readFileSync(file, 'utf8')), { filename: file, cachedData: readFileSync(file.replace(/\\.cjs$/, '.v8cache')) });",
      'console.log(s.cachedDataRejected);',
    ].join('\n');
    const r = spawnSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8' });
    t.equal(r.stderr, '', `${name}: no error`);
    t.equal(r.stdout.trim(), 'false', `${name}: the cache is not rejected`);
  }
});

// The registries describe themselves: the schema's model, split-rule, step and metric parts are
// generated from the entries (scripts/sync-schema.mjs, run by `npm run docs`), so a description,
// a default or a range lives in one place.
t.test("the schema's registry parts are the registries' own", async (t) => {
  const { registryParts, withRegistryParts } = await import('../../src/protocol/registry-schema.js');
  const schema = readSchema('protocol.schema.json');
  t.same(schema, withRegistryParts(schema), 'run npm run docs after changing a registry entry');
  t.equal(registryParts().length, 7, 'model, split rule, steps, metrics, the permutation metric, the inner split rule and tuning metric');
});
