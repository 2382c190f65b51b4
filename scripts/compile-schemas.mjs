#!/usr/bin/env node
// Build step: every schema in schema/ → standalone validator code in dist/validators/ (see
// src/protocol/schema.ts), stamped with the SHA-256 of the schema file it was made from.
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Ajv2020 } from 'ajv/dist/2020.js';
import standaloneCode from 'ajv/dist/standalone/index.js';
import { AJV_OPTIONS, compiledValidatorPath } from '../dist/src/protocol/schema-options.js';

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
}
