#!/usr/bin/env node
// Build step: every schema in schema/ → standalone validator code in dist/validators/ (see
// src/protocol/schema.ts), stamped with the SHA-256 of the schema file it was made from.
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import Module, { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { Script } from 'node:vm';
import { parse } from 'yaml';
import { fileURLToPath } from 'node:url';
import { Ajv2020 } from 'ajv/dist/2020.js';
import standaloneCode from 'ajv/dist/standalone/index.js';
import { AJV_OPTIONS, compiledValidatorPath } from '../dist/src/protocol/schema-options.js';
import { CLI_HEAP_FLAGS, useHeapFlags } from '../dist/src/io/heap-flags.js';

// V8 accepts a code cache only under the flags it was made with: the command line's.
useHeapFlags(CLI_HEAP_FLAGS);

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
for (const name of readdirSync(join(root, 'schema'))
  .filter((f) => f.endsWith('.schema.json'))
  .sort()) {
  const bytes = readFileSync(join(root, 'schema', name));
  const ajv = new Ajv2020({ ...AJV_OPTIONS, code: { source: true } });
  const validate = ajv.compile(JSON.parse(bytes.toString('utf8')));
  // Generated code: its branches are Ajv's, not ours, so coverage skips it.
  const standalone = standaloneCode.default ? standaloneCode.default(ajv, validate) : standaloneCode(ajv, validate);
  const sha = JSON.stringify(createHash('sha256').update(bytes).digest('hex'));
  const code = [
    '/* c8 ignore start */',
    standalone,
    'module.exports.validate = module.exports;',
    `module.exports.schemaSha256 = ${sha};`,
    '/* c8 ignore stop */',
    '',
  ].join('\n');
  const out = join(root, compiledValidatorPath(name));
  mkdirSync(dirname(out), { recursive: true });
  writeFileSync(out, code);
  // V8's code cache of the validator once it has checked the shipped protocols (its functions are
  // compiled as they are first called, and the cache keeps what was compiled): src/io/schemas.ts
  // loads the code with it when the running V8 accepts it.
  const script = new Script(Module.wrap(code), { filename: out });
  const module = { exports: {} };
  script.runInThisContext()(module.exports, createRequire(out), module, out, dirname(out));
  if (name === 'protocol.schema.json')
    for (const file of readdirSync(join(root, 'protocols')).filter((f) => f.endsWith('.yaml')))
      module.exports.validate(parse(readFileSync(join(root, 'protocols', file), 'utf8')));
  writeFileSync(out.replace(/\.cjs$/, '.v8cache'), script.createCachedData());
}
