/** RFC 8785 (JSON Canonicalization Scheme) bytes, via the maintained `canonicalize` package. */
import canonicalize from 'canonicalize';
import { sha256Bytes } from '../io/hash.js';

export function canonicalJson(value: unknown): string {
  assertPlainJson(value, '');
  const text = canonicalize(value);
  /* c8 ignore next -- assertPlainJson rejects every input canonicalize cannot serialize */
  if (text === undefined) throw new Error('value has no JSON form');
  return text;
}

export function canonicalSha256(value: unknown): string {
  return sha256Bytes(Buffer.from(canonicalJson(value), 'utf8'));
}

/** NaN, Infinity, undefined and non-plain objects must never reach signed bytes: fail loudly with the path. */
export function assertPlainJson(value: unknown, path: string): void {
  if (value === null || typeof value === 'string' || typeof value === 'boolean') return;
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new NonJsonValueError(path || '/', String(value));
    return;
  }
  if (Array.isArray(value)) { value.forEach((v, i) => assertPlainJson(v, `${path}/${i}`)); return; }
  if (typeof value === 'object' && Object.getPrototypeOf(value) === Object.prototype) {
    for (const [k, v] of Object.entries(value as Record<string, unknown>)) assertPlainJson(v, `${path}/${k}`);
    return;
  }
  throw new NonJsonValueError(path || '/', typeof value);
}

export class NonJsonValueError extends Error {
  constructor(readonly path: string, readonly what: string) {
    super(`value at ${path} is ${what}, which has no JSON form`);
    this.name = 'NonJsonValueError';
  }
}
