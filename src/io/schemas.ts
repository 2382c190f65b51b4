/**
 * Loads the JSON Schemas shipped in `schema/` (the single source of field docs) as validators.
 * The build precompiles each into standalone code (scripts/compile-schemas.mjs), which spares
 * every command Ajv's start-up; a validator whose schema changed since the build is compiled
 * here instead, so an edited schema is never checked with stale code.
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import type { ValidateFunction } from 'ajv/dist/2020.js';
import { packageRoot } from './package-root.js';
import { AJV_OPTIONS, compiledValidatorPath } from '../protocol/schema-options.js';

export const MANIFEST_SCHEMA = 'manifest.schema.json';

export function schemaPath(name: string): string {
  return join(packageRoot(), 'schema', name);
}

export function readSchema(name: string): Record<string, unknown> {
  return JSON.parse(readFileSync(schemaPath(name), 'utf8')) as Record<string, unknown>;
}

const compiled = new Map<string, ValidateFunction>();
const require = createRequire(import.meta.url);

export function schemaValidator(name: string): ValidateFunction {
  let v = compiled.get(name);
  if (!v) {
    v = precompiledValidator(name) ?? compileValidator(name);
    compiled.set(name, v);
  }
  return v;
}

/** The build's validator for `name`, or undefined when there is none or its schema has changed since. */
export function precompiledValidator(name: string): ValidateFunction | undefined {
  const file = join(packageRoot(), compiledValidatorPath(name));
  if (!existsSync(file)) return undefined;
  const mod = require(file) as { validate: ValidateFunction; schemaSha256: string };
  const now = createHash('sha256')
    .update(readFileSync(schemaPath(name)))
    .digest('hex');
  return mod.schemaSha256 === now ? mod.validate : undefined;
}

export function compileValidator(name: string): ValidateFunction {
  const { Ajv2020 } = require('ajv/dist/2020.js') as typeof import('ajv/dist/2020.js');
  return new Ajv2020(AJV_OPTIONS).compile(readSchema(name));
}
