/** Checks of a manifest's own bytes: JSON, version, schema, canonical form, signature. Pure (keys are passed in). */
import { createPublicKey, type KeyObject } from 'node:crypto';
import { error, warning, type Problem } from '../problems/problem.js';
import { schemaValidator } from '../protocol/schema.js';
import { MANIFEST_VERSION, type Manifest } from './build.js';
import { canonicalJson, NonJsonValueError } from './canonical.js';
import { changedMembers, fingerprint, manifestText, memberDigests, signatureValid, type Signature } from './sign.js';

export interface ManifestCheck {
  manifest?: Manifest;
  problems: Problem[];
  /** Fingerprint of the key the signature verified with. */
  signedBy?: string;
  pinned: boolean;
}

export interface CheckOptions {
  file: string;
  /** The signer's public key as the reviewer has it; without it the embedded key is unpinned. */
  publicKey?: KeyObject;
  allowUnpinned?: boolean;
}

export function checkManifest(text: string, o: CheckOptions): ManifestCheck {
  const file = o.file;
  let manifest: Manifest;
  try {
    manifest = JSON.parse(text) as Manifest;
  } catch (e) {
    return { problems: [error('manifest-not-json', `the manifest is not JSON (${(e as Error).message}); it may be truncated`, { file })], pinned: false };
  }
  if (manifest === null || typeof manifest !== 'object' || Array.isArray(manifest)) return { problems: [error('manifest-not-object', 'the manifest is not a JSON object', { file })], pinned: false };
  if (manifest['foldseal-manifest'] !== MANIFEST_VERSION) {
    return { problems: [error('manifest-version', `manifest format ${JSON.stringify(manifest['foldseal-manifest'] ?? null)} is not one this foldseal reads (format ${MANIFEST_VERSION})`, { file })], pinned: false };
  }
  const problems: Problem[] = [];
  const validate = schemaValidator('manifest.schema.json');
  if (!validate(manifest)) {
    for (const e of validate.errors ?? []) problems.push(error('manifest-schema', `${e.instancePath || '/'} ${e.message}${e.keyword === 'additionalProperties' ? ` (${String(e.params.additionalProperty)})` : ''}`, { file }));
    return { manifest, problems, pinned: false };
  }
  const signature = manifest.signature as Signature | undefined;
  let canonical: string;
  try {
    canonical = manifestText(manifest);
  } catch (e) {
    if (!(e instanceof NonJsonValueError)) throw e;
    problems.push(error('manifest-not-json', `the manifest holds a number out of range at ${e.path}`, { file }));
    return { manifest, problems, pinned: false };
  }
  if (text !== canonical) {
    problems.push(error('manifest-not-canonical', 'the file is not the canonical JSON foldseal writes (its bytes were changed after it was written)', { file, hint: 'a reformatted copy cannot be checked byte for byte; use the original file' }));
  }
  if (!signature) {
    problems.push((o.allowUnpinned ? warning : error)('manifest-unsigned', 'the manifest is not signed', { file, hint: 'the author signs with foldseal run --key PREFIX.key' }));
    return { manifest, problems, pinned: false };
  }
  // Base64 has spare bits in its last character: require the one canonical spelling, so no
  // character of the signature can change without the check noticing.
  for (const member of ['public-key', 'value'] as const) {
    if (Buffer.from(signature[member], 'base64').toString('base64') !== signature[member]) {
      problems.push(error('signature-encoding', `signature.${member} is not canonical base64 (it was edited)`, { file }));
      return { manifest, problems, pinned: false };
    }
  }
  let embedded: KeyObject;
  try {
    embedded = createPublicKey({ key: { kty: 'OKP', crv: 'Ed25519', x: Buffer.from(signature['public-key'], 'base64').toString('base64url') }, format: 'jwk' });
  } catch {
    problems.push(error('signature-bad-key', 'the embedded public key is not a valid Ed25519 key', { file }));
    return { manifest, problems, pinned: false };
  }
  if (fingerprint(embedded) !== signature['key-sha256']) problems.push(error('signature-key-mismatch', 'the embedded public key does not match its recorded fingerprint', { file }));
  let key = embedded;
  if (o.publicKey) {
    const given = fingerprint(o.publicKey);
    if (given !== signature['key-sha256']) {
      problems.push(error('signature-wrong-key', `the manifest is signed by key ${signature['key-sha256']}, not by the given key ${given}`, { file }));
      return { manifest, problems, pinned: true };
    }
    key = o.publicKey;
  }
  if (!signatureValid(manifest, key, signature.value)) {
    const changed = changedMembers(manifest, signature.members);
    problems.push(error('signature-invalid', changed.length ? `the signature does not match the content: ${changed[0]} changed after signing${changed.length > 1 ? ` (and ${changed.length - 1} more member${changed.length === 2 ? '' : 's'}: ${changed.slice(1, 6).join(', ')})` : ''}` : 'the signature does not match the content (the signature itself was changed)', { file }));
    return { manifest, problems, pinned: Boolean(o.publicKey) };
  }
  // The member digests are diagnostics outside the signed bytes; with a valid signature they must
  // still equal the content's, or someone edited them.
  if (canonicalJson(signature.members) !== canonicalJson(memberDigests(manifest))) {
    problems.push(error('signature-members-edited', 'signature.members no longer matches the signed content (it was edited)', { file }));
  }
  if (!o.publicKey) {
    problems.push((o.allowUnpinned ? warning : error)('signature-unpinned', `the signature is valid for the key embedded in the manifest (${signature['key-sha256']}), but that key is not pinned`, { file, hint: "pass the author's public key with --key AUTHOR.pub (or --allow-unpinned to accept the embedded key)" }));
  }
  return { manifest, problems, signedBy: signature['key-sha256'], pinned: Boolean(o.publicKey) };
}
