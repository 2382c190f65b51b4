/** Wraps a run's outputs in a manifest (and signs it when a key is given). Pure: time, tool and keys come in. */
import type { KeyObject } from 'node:crypto';
import type { ValidateFunction } from 'ajv/dist/2020.js';
import type { RunInput, RunOutput } from './run.js';
import { assignmentTriples, buildManifest, MANIFEST_FILES, type Manifest, type ToolInfo } from '../manifest/build.js';
import { canonicalSha256 } from '../manifest/canonical.js';
import { manifestBytes, signManifest } from '../manifest/sign.js';

export interface ManifestMeta {
  tool: ToolInfo;
  created: string;
  /** Folder of the protocol file relative to the results folder. */
  protocolLocation: string;
  key?: { privateKey: KeyObject; publicKey: KeyObject };
  /** The manifest schema's validator: a manifest foldseal writes must pass it (io/schemas.ts loads it). */
  validate: ValidateFunction;
  /**
   * The manifest is only written (run, merge): its assignment goes in as canonical text, never as
   * a million small arrays, and the schema check sees its first rows. verify, which compares
   * manifests, leaves this off.
   */
  textOnly?: boolean;
}

export function manifestForRun(
  input: RunInput,
  out: RunOutput,
  meta: ManifestMeta,
): { manifest: Manifest; bytes: Uint8Array; text: string } {
  const files: Record<string, string> = {};
  for (const name of MANIFEST_FILES) if (out.digests[name] !== undefined) files[name] = out.digests[name];
  let manifest = buildManifest(
    {
      tool: meta.tool,
      created: meta.created,
      protocol: { document: input.raw, sha256: canonicalSha256(input.raw), location: meta.protocolLocation },
      dataSha256: input.dataSha256,
      table: input.table,
      assignment: input.assignment,
      assignmentSha256: out.assignmentSha256,
      results: out.results,
      files,
    },
    meta.textOnly,
  );
  if (meta.key) manifest = signManifest(manifest, meta.key.privateKey, meta.key.publicKey);
  const validate = meta.validate;
  const checked = meta.textOnly
    ? { ...manifest, split: { ...(manifest.split as object), assignment: assignmentTriples(input.assignment, 8) } }
    : manifest;
  /* c8 ignore next 3 -- a manifest that fails its own schema is a bug in foldseal, reported as one */
  if (!validate(checked)) {
    throw new Error(`foldseal wrote a manifest that fails schema/manifest.schema.json: ${JSON.stringify(validate.errors)}`);
  }
  const bytes = manifestBytes(manifest);
  return {
    manifest,
    bytes,
    // The file's text, made only when asked for (run writes the bytes).
    get text() {
      return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.length).toString('utf8');
    },
  };
}
