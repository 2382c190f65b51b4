/**
 * Loads the JSON Schemas shipped in `schema/` (the single source of field docs) as validators.
 * The build precompiles each into standalone code (scripts/compile-schemas.mjs), which spares
 * every command Ajv's start-up; a validator whose schema changed since the build is compiled
 * here instead, so an edited schema is never checked with stale code.
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import Module, { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { Script } from 'node:vm';
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
  const mod = requireCached(file) as { validate: ValidateFunction; schemaSha256: string };
  const now = createHash('sha256')
    .update(readFileSync(schemaPath(name)))
    .digest('hex');
  return mod.schemaSha256 === now ? mod.validate : undefined;
}

/**
 * The CommonJS module at `file`, compiled with the V8 code cache the build wrote beside it
 * (`.v8cache`, made after validating the shipped protocols) when this Node's V8 accepts it: the
 * protocol's 230 KB validator then loads and first runs in a third of the time. A cache V8 does
 * not accept (another Node version) is ignored, and the code compiled as usual.
 */
export function requireCached(file: string): unknown {
  const cache = file.replace(/\.cjs$/, '.v8cache');
  if (!existsSync(cache)) return require(file);
  const script = new Script(Module.wrap(readFileSync(file, 'utf8')), { filename: file, cachedData: readFileSync(cache) });
  const module = { exports: {} as unknown };
  script.runInThisContext()(module.exports, createRequire(file), module, file, dirname(file));
  return module.exports;
}

export function compileValidator(name: string): ValidateFunction {
  const { Ajv2020 } = require('ajv/dist/2020.js') as typeof import('ajv/dist/2020.js');
  return new Ajv2020(AJV_OPTIONS).compile(readSchema(name));
}
