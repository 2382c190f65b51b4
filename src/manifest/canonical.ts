/**
 * RFC 8785 (JSON Canonicalization Scheme): object members sorted by their names' UTF-16 code
 * units, no whitespace, and strings and numbers written exactly as ECMAScript's JSON.stringify
 * writes them (RFC 8785 §3.2.2 defers to ECMA-262 for both). Values that JSON cannot carry
 * (NaN, ±Infinity, undefined, class instances) fail loudly with their path, so they never reach
 * signed bytes.
 */
import { sha256Bytes } from '../util/sha256.js';
import { ByteBuilder } from '../util/byte-builder.js';

/**
 * A value already written as canonical JSON, spliced in as it is: the manifest's assignment of a
 * million rows is written straight from the assignment instead of through a million small arrays.
 * Whoever makes one vouches for its canonical form (tests compare it with the general writer).
 */
export class CanonicalText {
  /**
   * The text, or its UTF-8 bytes, or what writes those bytes where they go (then `size`, their
   * length or about it, lets the buffer be made large enough at once).
   */
  constructor(
    readonly json: string | Uint8Array | ((out: ByteBuilder) => void),
    readonly size = 0,
  ) {}
}

export function canonicalJson(value: unknown): string {
  const parts: string[] = [];
  const decoded = (bytes: Uint8Array) => Buffer.from(bytes.buffer, bytes.byteOffset, bytes.length).toString('utf8');
  write(
    value,
    [],
    (text) => parts.push(text),
    (bytes) => parts.push(decoded(bytes)),
    (writer, size) => {
      const out = new ByteBuilder(size + 16);
      writer(out);
      parts.push(decoded(out.result()));
    },
  );
  return parts.join('');
}

/** canonicalJson's UTF-8 bytes, then `after`, written straight into one buffer (a million-row manifest never becomes one string). */
export function canonicalBytes(value: unknown, after = ''): Uint8Array {
  // Room for the large pieces at once: a buffer that doubled past them would hold up to twice their size.
  const out = new ByteBuilder(spliced(value) + (1 << 16));
  write(
    value,
    [],
    (text) => out.text(text),
    (bytes) => out.append(bytes),
    (writer) => writer(out),
  );
  out.text(after);
  return out.result();
}

export function canonicalSha256(value: unknown): string {
  return sha256Bytes(canonicalJson(value));
}

/** The canonical text of `value`, handed to `emit` piece by piece in order (pieces that are bytes already to `emitBytes`). */
function write(
  value: unknown,
  path: (string | number)[],
  emit: (text: string) => void,
  emitBytes: (bytes: Uint8Array) => void,
  emitWriter: (writer: (out: ByteBuilder) => void, size: number) => void,
): void {
  if (value instanceof CanonicalText) {
    const { json } = value;
    if (typeof json === 'string') emit(json);
    else if (typeof json === 'function') emitWriter(json, value.size);
    else emitBytes(json);
    return;
  }
  if (value === null || typeof value === 'string' || typeof value === 'boolean') {
    emit(JSON.stringify(value));
    return;
  }
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) fail(path, String(value));
    emit(JSON.stringify(value));
    return;
  }
  if (Array.isArray(value)) {
    // Arrays without objects (fold assignments, probabilities) are the bulk of a manifest:
    // JSON.stringify already writes them canonically once their numbers are known to be finite.
    if (flat(value)) {
      emit(JSON.stringify(value));
      return;
    }
    emit('[');
    for (let i = 0; i < value.length; i++) {
      if (i > 0) emit(',');
      path.push(i);
      write(value[i], path, emit, emitBytes, emitWriter);
      path.pop();
    }
    emit(']');
    return;
  }
  if (typeof value === 'object' && Object.getPrototypeOf(value) === Object.prototype) {
    const record = value as Record<string, unknown>;
    // Default string order compares UTF-16 code units, as §3.2.3 requires.
    const names = Object.keys(record).sort();
    emit('{');
    for (let i = 0; i < names.length; i++) {
      emit(`${i > 0 ? ',' : ''}${JSON.stringify(names[i])}:`);
      path.push(names[i]);
      write(record[names[i]], path, emit, emitBytes, emitWriter);
      path.pop();
    }
    emit('}');
    return;
  }
  fail(path, typeof value);
}

/** The bytes of the CanonicalText pieces in `value` (at most, for texts: three per UTF-16 unit). */
function spliced(value: unknown): number {
  if (value instanceof CanonicalText)
    return typeof value.json === 'string' ? value.json.length * 3 : typeof value.json === 'function' ? value.size : value.json.length;
  if (value === null || typeof value !== 'object') return 0;
  let sum = 0;
  for (const v of Array.isArray(value) ? value : Object.values(value)) if (v !== null && typeof v === 'object') sum += spliced(v);
  return sum;
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
