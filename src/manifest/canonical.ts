/**
 * RFC 8785 (JSON Canonicalization Scheme): object members sorted by their names' UTF-16 code
 * units, no whitespace, and strings and numbers written exactly as ECMAScript's JSON.stringify
 * writes them (RFC 8785 §3.2.2 defers to ECMA-262 for both). Values that JSON cannot carry
 * (NaN, ±Infinity, undefined, class instances) fail loudly with their path, so they never reach
 * signed bytes.
 */
import { sha256Bytes } from '../util/sha256.js';

/**
 * A value already written as canonical JSON, spliced in as it is: the manifest's assignment of a
 * million rows is written straight from the assignment instead of through a million small arrays.
 * Whoever makes one vouches for its canonical form (tests compare it with the general writer).
 */
export class CanonicalText {
  constructor(readonly json: string) {}
}

export function canonicalJson(value: unknown): string {
  const path: (string | number)[] = [];
  return write(value, path);
}

export function canonicalSha256(value: unknown): string {
  return sha256Bytes(Buffer.from(canonicalJson(value), 'utf8'));
}

function write(value: unknown, path: (string | number)[]): string {
  if (value instanceof CanonicalText) return value.json;
  if (value === null || typeof value === 'string' || typeof value === 'boolean') return JSON.stringify(value);
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) fail(path, String(value));
    return JSON.stringify(value);
  }
  if (Array.isArray(value)) {
    // Arrays without objects (fold assignments, probabilities) are the bulk of a manifest:
    // JSON.stringify already writes them canonically once their numbers are known to be finite.
    if (flat(value)) return JSON.stringify(value);
    const parts = new Array<string>(value.length);
    for (let i = 0; i < value.length; i++) {
      path.push(i);
      parts[i] = write(value[i], path);
      path.pop();
    }
    return `[${parts.join(',')}]`;
  }
  if (typeof value === 'object' && Object.getPrototypeOf(value) === Object.prototype) {
    const record = value as Record<string, unknown>;
    // Default string order compares UTF-16 code units, as §3.2.3 requires.
    const names = Object.keys(record).sort();
    const parts = new Array<string>(names.length);
    for (let i = 0; i < names.length; i++) {
      path.push(names[i]);
      parts[i] = `${JSON.stringify(names[i])}:${write(record[names[i]], path)}`;
      path.pop();
    }
    return `{${parts.join(',')}}`;
  }
  return fail(path, typeof value);
}

/** Only strings, finite numbers, booleans, null, and arrays of those, one level deep. */
function flat(values: unknown[]): boolean {
  for (const v of values) {
    if (Array.isArray(v)) {
      for (const w of v) if (!primitive(w)) return false;
    } else if (!primitive(v)) return false;
  }
  return true;
}

function primitive(v: unknown): boolean {
  return v === null || typeof v === 'string' || typeof v === 'boolean' || (typeof v === 'number' && Number.isFinite(v));
}

function fail(path: readonly (string | number)[], what: string): never {
  throw new NonJsonValueError(path.length ? `/${path.join('/')}` : '/', what);
}

export class NonJsonValueError extends Error {
  constructor(
    readonly path: string,
    readonly what: string,
  ) {
    super(`value at ${path} is ${what}, which has no JSON form`);
    this.name = 'NonJsonValueError';
  }
}
