/**
 * Signing and checking a manifest: the signed bytes are the RFC 8785 canonical JSON of the
 * manifest without its `signature` member; the signature is Ed25519 (RFC 8032) via node:crypto.
 */
import { createHash, sign as edSign, verify as edVerify, type KeyObject } from 'node:crypto';
import { canonicalBytes, canonicalJson } from './canonical.js';
import type { Manifest } from './build.js';

export interface Signature {
  algorithm: 'Ed25519';
  'key-sha256': string;
  'public-key': string;
  value: string;
  /** sha256 of the canonical JSON of each member down to depth 2 — diagnostics for naming what changed. */
  members: Record<string, string>;
}

export function signingBytes(manifest: Manifest): Buffer {
  const { signature: _omit, ...rest } = manifest;
  void _omit;
  const bytes = canonicalBytes(rest);
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.length);
}

/** The raw 32-byte Ed25519 public key. */
export function rawPublicKey(key: KeyObject): Buffer {
  return Buffer.from(key.export({ format: 'jwk' }).x as string, 'base64url');
}

export function fingerprint(publicKey: KeyObject): string {
  return createHash('sha256').update(rawPublicKey(publicKey)).digest('hex');
}

export function memberDigests(manifest: Manifest): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (value: unknown, path: string, depth: number) => {
    out[path || '/'] = createHash('sha256')
      .update(canonicalJson(value ?? null))
      .digest('hex');
    if (depth === 2 || value === null || typeof value !== 'object' || Array.isArray(value)) return;
    for (const [k, v] of Object.entries(value as Record<string, unknown>).sort(([a], [b]) => (a < b ? -1 : 1)))
      walk(v, `${path}/${k.replaceAll('~', '~0').replaceAll('/', '~1')}`, depth + 1);
  };
  const { signature: _omit, ...rest } = manifest;
  void _omit;
  for (const [k, v] of Object.entries(rest).sort(([a], [b]) => (a < b ? -1 : 1))) walk(v, `/${k}`, 1);
  return out;
}

export function signManifest(manifest: Manifest, privateKey: KeyObject, publicKey: KeyObject): Manifest {
  const value = edSign(null, signingBytes(manifest), privateKey).toString('base64');
  const signature: Signature = {
    algorithm: 'Ed25519',
    'key-sha256': fingerprint(publicKey),
    'public-key': rawPublicKey(publicKey).toString('base64'),
    value,
    members: memberDigests(manifest),
  };
  return { ...manifest, signature };
}

export function signatureValid(manifest: Manifest, publicKey: KeyObject, value: string): boolean {
  try {
    return edVerify(null, signingBytes(manifest), publicKey, Buffer.from(value, 'base64'));
  } catch {
    return false;
  }
}

/** Members whose canonical digest no longer matches the one recorded at signing, deepest first. */
export function changedMembers(manifest: Manifest, recorded: Record<string, string>): string[] {
  const now = memberDigests(manifest);
  const paths = new Set([...Object.keys(now), ...Object.keys(recorded)]);
  const changed = [...paths].filter((p) => now[p] !== recorded[p]).sort();
  // Report the most specific paths: drop a path when one of its children is also listed.
  return changed.filter((p) => !changed.some((q) => q !== p && q.startsWith(p + '/')));
}

/** Serialized manifest file: canonical JSON plus a newline, so any byte change is detectable. */
export function manifestText(manifest: Manifest): string {
  return canonicalJson(manifest) + '\n';
}

/** manifestText's UTF-8 bytes, written without the text. */
export function manifestBytes(manifest: Manifest): Uint8Array {
  return canonicalBytes(manifest, '\n');
}
