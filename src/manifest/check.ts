/** Checks of a manifest's own bytes: JSON, version, schema, canonical form, signature. Pure (keys are passed in). */
import { createHash, createPublicKey, type KeyObject } from 'node:crypto';
import { error, warning, type Problem } from '../problems/problem.js';
import { MAX_NESTING, nestingDepth } from '../util/nesting.js';
import type { ValidateFunction } from 'ajv/dist/2020.js';
import { MANIFEST_VERSION, type Manifest } from './build.js';
import { canonicalJson, NonJsonValueError } from './canonical.js';
import { changedMembers, fingerprint, manifestText, memberDigests, signatureValid, type Signature } from './sign.js';
import {
  ed25519Blob,
  MANIFEST_NAMESPACE,
  parseSshsig,
  SSH_ED25519,
  sshFingerprint,
  SshFormatError,
  sshsigValid,
  type Sshsig,
} from './ssh.js';

/** A key the reviewer trusts: the raw Ed25519 key and, from an allowed_signers file, who it belongs to. */
export interface PinnedKey {
  raw: Buffer;
  principals?: string[];
}

export interface ManifestCheck {
  manifest?: Manifest;
  problems: Problem[];
  /** Fingerprint of the key the signature verified with (hex SHA-256 of the raw key). */
  signedBy?: string;
  /** For an SSH signature (manifest.json.sig): OpenSSH's fingerprint of the key, and the principals the pinned file gives it. */
  ssh?: { fingerprint: string; principals?: string[] };
  /** OpenSSH's fingerprint (SHA256:…) of the signing key, however the manifest was signed. */
  sshFingerprint?: string;
  pinned: boolean;
}

export interface CheckOptions {
  file: string;
  /** The signer's public key(s) as the reviewer has them; without them the embedded key is unpinned. */
  pinned?: PinnedKey[];
  allowUnpinned?: boolean;
  /** The text of manifest.json.sig next to the manifest (an SSH signature over the file's bytes), when there is one. */
  detached?: string;
  /** The manifest schema's validator (the shell loads it: io/schemas.ts). */
  validate: ValidateFunction;
}

export function rawFingerprint(raw: Uint8Array): string {
  return createHash('sha256').update(raw).digest('hex');
}

export function checkManifest(text: string, o: CheckOptions): ManifestCheck {
  const file = o.file;
  let manifest: Manifest;
  if (nestingDepth(text, MAX_NESTING).depth > MAX_NESTING)
    return {
      problems: [
        error(
          'manifest-too-deep',
          `the manifest nests more than ${MAX_NESTING} levels deep; no manifest foldseal writes does, so it was not read further`,
          { file },
        ),
      ],
      pinned: false,
    };
  try {
    manifest = JSON.parse(text) as Manifest;
  } catch (e) {
    return {
      problems: [error('manifest-not-json', `the manifest is not JSON (${(e as Error).message}); it may be truncated`, { file })],
      pinned: false,
    };
  }
  if (manifest === null || typeof manifest !== 'object' || Array.isArray(manifest))
    return { problems: [error('manifest-not-object', 'the manifest is not a JSON object', { file })], pinned: false };
  if (manifest['foldseal-manifest'] !== MANIFEST_VERSION) {
    return {
      problems: [
        error(
          'manifest-version',
          `manifest format ${JSON.stringify(manifest['foldseal-manifest'] ?? null)} is not one this foldseal reads (format ` +
            `${MANIFEST_VERSION})`,
          { file },
        ),
      ],
      pinned: false,
    };
  }
  const problems: Problem[] = [];
  const validate = o.validate;
  if (!validate(manifest)) {
    for (const e of validate.errors ?? [])
      problems.push(
        error(
          'manifest-schema',
          `${e.instancePath || '/'} ${e.message}${e.keyword === 'additionalProperties' ? ` (${String(e.params.additionalProperty)})` : ''}`,
          { file },
        ),
      );
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
    problems.push(
      error('manifest-not-canonical', 'the file is not the canonical JSON foldseal writes (its bytes were changed after it was written)', {
        file,
        hint: 'a reformatted copy cannot be checked byte for byte; use the original file',
      }),
    );
  }
  if (signature && o.detached !== undefined) {
    problems.push(
      error('signature-twice', 'the manifest carries a signature and has a manifest.json.sig beside it; a manifest is signed one way', {
        file,
      }),
    );
    return { manifest, problems, pinned: false };
  }
  if (!signature && o.detached !== undefined) {
    const d = checkDetached(text, o);
    return { manifest, ...d, problems: [...problems, ...d.problems] };
  }
  if (!signature) {
    problems.push(
      (o.allowUnpinned ? warning : error)('manifest-unsigned', 'the manifest is not signed', {
        file,
        hint: 'the author signs with foldseal run --key PREFIX.key',
      }),
    );
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
    embedded = createPublicKey({
      key: { kty: 'OKP', crv: 'Ed25519', x: Buffer.from(signature['public-key'], 'base64').toString('base64url') },
      format: 'jwk',
    });
  } catch {
    problems.push(error('signature-bad-key', 'the embedded public key is not a valid Ed25519 key', { file }));
    return { manifest, problems, pinned: false };
  }
  if (fingerprint(embedded) !== signature['key-sha256'])
    problems.push(error('signature-key-mismatch', 'the embedded public key does not match its recorded fingerprint', { file }));
  const pinnedKeys = o.pinned ?? [];
  if (pinnedKeys.length && !pinnedKeys.some((k) => rawFingerprint(k.raw) === signature['key-sha256'])) {
    problems.push(
      error(
        'signature-wrong-key',
        `the manifest is signed by key ${signature['key-sha256']}, not by the given key${pinnedKeys.length === 1 ? '' : 's'} ` +
          `${pinnedKeys.map((k) => rawFingerprint(k.raw)).join(', ')}`,
        { file },
      ),
    );
    return { manifest, problems, pinned: true };
  }
  const pinned = pinnedKeys.length > 0;
  if (!signatureValid(manifest, embedded, signature.value)) {
    const changed = changedMembers(manifest, signature.members);
    problems.push(
      error(
        'signature-invalid',
        changed.length
          ? `the signature does not match the content: ${changed[0]} changed after signing${moreChanged(changed)}`
          : 'the signature does not match the content (the signature itself was changed)',
        { file },
      ),
    );
    return { manifest, problems, pinned };
  }
  // The member digests are diagnostics outside the signed bytes; with a valid signature they must
  // still equal the content's, or someone edited them.
  if (canonicalJson(signature.members) !== canonicalJson(memberDigests(manifest))) {
    problems.push(error('signature-members-edited', 'signature.members no longer matches the signed content (it was edited)', { file }));
  }
  if (!pinned) problems.push(unpinnedProblem(signature['key-sha256'], file, o.allowUnpinned));
  return {
    manifest,
    problems,
    signedBy: signature['key-sha256'],
    sshFingerprint: sshFingerprint(ed25519Blob(Buffer.from(signature['public-key'], 'base64'))),
    pinned,
  };
}

function unpinnedProblem(fp: string, file: string, allowUnpinned?: boolean) {
  return (allowUnpinned ? warning : error)(
    'signature-unpinned',
    `the signature is valid for the key embedded in the manifest (${fp}), but that key is not pinned`,
    {
      file,
      hint:
        "pass the author's public key with --key AUTHOR.pub (an OpenSSH key line or an allowed_signers file will do), or " +
        '--allow-unpinned to accept the embedded key',
    },
  );
}

/**
 * An SSH signature in manifest.json.sig: SSHSIG over the exact bytes of manifest.json, namespace
 * foldseal-manifest, Ed25519 keys only. `ssh-keygen -Y verify` checks the same thing.
 */
function checkDetached(text: string, o: CheckOptions): Omit<ManifestCheck, 'manifest'> {
  const file = `${o.file}.sig`;
  const problems: Problem[] = [];
  let sig: Sshsig;
  try {
    sig = parseSshsig(o.detached!);
  } catch (e) {
    if (!(e instanceof SshFormatError)) throw e;
    return { problems: [error('signature-encoding', `manifest.json.sig is not an SSH signature: ${e.message}`, { file })], pinned: false };
  }
  if (sig.publicKey.type !== SSH_ED25519)
    return {
      problems: [
        error(
          'signature-key-type',
          `manifest.json.sig is made with a ${sig.publicKey.type} key; foldseal verifies Ed25519 signatures only`,
          { file, hint: 'sign with an Ed25519 key (ssh-keygen -t ed25519)' },
        ),
      ],
      pinned: false,
    };
  if (sig.namespace !== MANIFEST_NAMESPACE)
    return {
      problems: [
        error(
          'signature-namespace',
          `manifest.json.sig is a signature for namespace "${sig.namespace}", not "${MANIFEST_NAMESPACE}" (a signature made for ` +
            `another purpose)`,
          { file, hint: `sign with ssh-keygen -Y sign -n ${MANIFEST_NAMESPACE}` },
        ),
      ],
      pinned: false,
    };
  const hex = rawFingerprint(sig.publicKey.raw!);
  const ssh = { fingerprint: sshFingerprint(ed25519Blob(sig.publicKey.raw!)) };
  const pinnedKeys = o.pinned ?? [];
  const match = pinnedKeys.find((k) => k.raw.equals(sig.publicKey.raw!));
  if (pinnedKeys.length && !match) {
    return {
      problems: [
        error(
          'signature-wrong-key',
          `manifest.json.sig is signed by key ${ssh.fingerprint}, not by the given key${pinnedKeys.length === 1 ? '' : 's'} ` +
            `${pinnedKeys.map((k) => sshFingerprint(ed25519Blob(k.raw))).join(', ')}`,
          { file },
        ),
      ],
      pinned: true,
      ssh,
    };
  }
  if (!sshsigValid(sig, Buffer.from(text, 'utf8'))) {
    return {
      problems: [
        error(
          'signature-invalid',
          'manifest.json.sig does not match the bytes of manifest.json (the manifest or the signature was changed after signing)',
          { file },
        ),
      ],
      pinned: Boolean(match),
      ssh,
    };
  }
  if (!match) problems.push(unpinnedProblem(ssh.fingerprint, file, o.allowUnpinned));
  return {
    problems,
    signedBy: hex,
    ssh: { ...ssh, principals: match?.principals },
    sshFingerprint: ssh.fingerprint,
    pinned: Boolean(match),
  };
}

/** ` (and N more members: a, b, …)` after the first changed member, or nothing. */
function moreChanged(changed: readonly string[]): string {
  if (changed.length < 2) return '';
  const more = changed.length - 1;
  return ` (and ${more} more member${more === 1 ? '' : 's'}: ${changed.slice(1, 6).join(', ')})`;
}
