/** Loads the JSON Schemas shipped in `schema/` (the single source of field docs) and compiles them once. */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv2020, type ValidateFunction } from 'ajv/dist/2020.js';
import { packageRoot } from '../util/package-root.js';

export function schemaPath(name: string): string {
  return join(packageRoot(), 'schema', name);
}

export function readSchema(name: string): Record<string, unknown> {
  return JSON.parse(readFileSync(schemaPath(name), 'utf8')) as Record<string, unknown>;
}

const compiled = new Map<string, ValidateFunction>();

export function schemaValidator(name: string): ValidateFunction {
  let v = compiled.get(name);
  if (!v) {
    const ajv = new Ajv2020({ allErrors: true, verbose: true, strict: true, strictRequired: false, allowUnionTypes: true });
    v = ajv.compile(readSchema(name));
    compiled.set(name, v);
  }
  return v;
}
