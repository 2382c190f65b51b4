/** Ed25519 key files at the edge: PKCS#8 PEM private keys (mode 0600) and SPKI PEM public keys. */
import { createPrivateKey, createPublicKey, generateKeyPairSync, type KeyObject } from 'node:crypto';
import { chmod, lstat, unlink, writeFile } from 'node:fs/promises';
import { error, FoldsealError } from '../problems/problem.js';
import { fingerprint, rawPublicKey } from '../manifest/sign.js';
import type { PinnedKey } from '../manifest/check.js';
import {
  ed25519Blob,
  ed25519SignatureBlob,
  isOpensshPrivateKey,
  MANIFEST_NAMESPACE,
  parseKeyLines,
  parseOpensshPrivateKey,
  signatureFromBlob,
  SSH_ED25519,
  sshFingerprint,
  type SshPublicKey,
} from '../manifest/ssh.js';
import { AgentError, agentIdentities, agentSign } from './ssh-agent.js';
import { fileProblem, readRegularText } from './files.js';
import { writeProblem } from './output-file.js';

async function readPem(path: string): Promise<string> {
  try {
    return await readRegularText(path, 1 << 20);
  } catch (e) {
    throw new FoldsealError(fileProblem(e as NodeJS.ErrnoException, path, { file: path }), 2);
  }
}

function keyError(path: string, message: string, hint?: string): FoldsealError {
  return new FoldsealError(error('bad-key', message, { file: path, hint }), 2);
}

/** How a manifest gets signed: a foldseal key embeds the signature; an SSH key writes manifest.json.sig. */
export type SigningKey =
  | { kind: 'raw'; privateKey: KeyObject; publicKey: KeyObject }
  | { kind: 'ssh'; blob: Buffer; describe: string; sign: (data: Buffer) => Promise<Buffer> };

/**
 * The key `run --key PATH` signs with:
 * - a PEM private key from foldseal keygen (the signature is embedded in manifest.json);
 * - an unencrypted OpenSSH Ed25519 private key (~/.ssh/id_ed25519): an SSH signature;
 * - an OpenSSH public key (~/.ssh/id_ed25519.pub): the same signature made by ssh-agent, so the
 *   private key never touches foldseal.
 */
export async function readSigningKey(path: string, env: NodeJS.ProcessEnv = process.env): Promise<SigningKey> {
  const text = await readPem(path);
  if (isOpensshPrivateKey(text)) return opensshSigner(path, text);
  if (/-----BEGIN PUBLIC KEY-----/.test(text))
    throw keyError(
      path,
      `${path} is a public key; signing needs the private key`,
      'pass the .key file that foldseal keygen wrote, not the .pub',
    );
  const lines = parseKeyLines(text);
  if (lines.keys.length) return agentSigner(path, lines.keys[0].key, env);
  let key: KeyObject;
  try {
    key = createPrivateKey(text);
  } catch {
    throw keyError(
      path,
      `${path} is not a private key foldseal reads (a PEM key from foldseal keygen, an OpenSSH private key, or an OpenSSH public ` +
        `key to sign through ssh-agent)`,
    );
  }
  if (key.asymmetricKeyType !== 'ed25519')
    throw keyError(
      path,
      `${path} is a ${key.asymmetricKeyType} key; foldseal signs with Ed25519`,
      'make one with foldseal keygen or ssh-keygen -t ed25519',
    );
  return { kind: 'raw', privateKey: key, publicKey: createPublicKey(key) };
}

function opensshSigner(path: string, text: string): SigningKey {
  let parsed: ReturnType<typeof parseOpensshPrivateKey>;
  try {
    parsed = parseOpensshPrivateKey(text);
  } catch (e) {
    throw keyError(path, `${path} is not a readable OpenSSH private key: ${(e as Error).message}`);
  }
  if (parsed.kind === 'encrypted')
    throw keyError(
      path,
      `${path} is protected by a passphrase (${parsed.cipher}); foldseal never asks for passphrases`,
      `load it into your agent (ssh-add ${path}) and pass the public key: --key ${path}.pub`,
    );
  if (parsed.kind === 'other')
    throw keyError(path, `${path} is a ${parsed.type} key; foldseal signs with Ed25519 keys only`, 'make one with ssh-keygen -t ed25519');
  const privateKey = parsed.privateKey;
  return {
    kind: 'ssh',
    blob: ed25519Blob(parsed.raw),
    describe: `${sshFingerprint(ed25519Blob(parsed.raw))}${parsed.comment ? ` (${parsed.comment})` : ''}`,
    sign: async (data) => ed25519SignatureBlob(privateKey, data),
  };
}

function agentSigner(path: string, key: SshPublicKey, env: NodeJS.ProcessEnv): SigningKey {
  if (key.type !== SSH_ED25519)
    throw keyError(path, `${path} is a ${key.type} key; foldseal signs with Ed25519 keys only`, 'make one with ssh-keygen -t ed25519');
  const socket = env.SSH_AUTH_SOCK;
  if (!socket)
    throw keyError(
      path,
      `${path} is a public key, and signing with it needs ssh-agent, but SSH_AUTH_SOCK is not set`,
      'start an agent (eval "$(ssh-agent)") and add the key (ssh-add), or pass the private key file',
    );
  const fp = sshFingerprint(key.blob);
  return {
    kind: 'ssh',
    blob: key.blob,
    describe: `${fp} (through ssh-agent)`,
    sign: async (data) => {
      try {
        const held = await agentIdentities(socket);
        if (!held.some((h) => h.blob.equals(key.blob))) throw new AgentError(`the agent does not hold the key ${fp}`);
        const blob = await agentSign(socket, key.blob, data);
        if (signatureFromBlob(blob).type !== SSH_ED25519) throw new AgentError('the agent answered with a signature of another type');
        return blob;
      } catch (e) {
        if (e instanceof AgentError)
          throw keyError(
            path,
            `signing through ssh-agent failed: ${e.message}`,
            `add the key with ssh-add (ssh-add -l lists what the agent holds)`,
          );
        throw e;
      }
    },
  };
}

/**
 * The keys `verify --key FILE` (and the team policy) pin: a PEM public key from foldseal keygen,
 * OpenSSH public key lines (a .pub file, an authorized_keys-style list), or git's allowed_signers
 * file. Only Ed25519 keys are kept; lines limited to other namespaces are left out.
 */
export async function readPinnedKeys(path: string): Promise<PinnedKey[]> {
  const text = await readPem(path);
  if (/-----BEGIN (ENCRYPTED |OPENSSH |)PRIVATE KEY-----/.test(text))
    throw keyError(
      path,
      `${path} is a private key; verifying needs only the public key`,
      'pass the .pub file, and keep the private key to yourself',
    );
  if (/-----BEGIN PUBLIC KEY-----/.test(text)) {
    let key: KeyObject;
    try {
      key = createPublicKey(text);
    } catch {
      throw keyError(path, `${path} is not a PEM public key`);
    }
    if (key.asymmetricKeyType !== 'ed25519')
      throw keyError(path, `${path} is a ${key.asymmetricKeyType} key; foldseal manifests are signed with Ed25519`);
    return [{ raw: rawPublicKey(key) }];
  }
  const { keys, problems } = parseKeyLines(text);
  if (problems.length) throw keyError(path, `${path} line ${problems[0].line} ${problems[0].message}`);
  const usable = keys.filter(
    (k) => k.key.type === SSH_ED25519 && !k.certAuthority && (!k.namespaces || k.namespaces.includes(MANIFEST_NAMESPACE)),
  );
  if (!usable.length) {
    const types = [...new Set(keys.map((k) => k.key.type))];
    throw keyError(
      path,
      keys.length
        ? `${path} holds no Ed25519 key usable for foldseal manifests ` +
            `(${types.join(', ')}${keys.some((k) => k.namespaces) ? '; or limited to other namespaces' : ''}); foldseal verifies ` +
            `Ed25519 signatures only`
        : `${path} holds no public key`,
    );
  }
  return usable.map((k) => ({ raw: k.key.raw!, principals: k.principals }));
}

/** Writes PREFIX.key (mode 0600) and PREFIX.pub: both or neither, never over an existing file. */
export async function writeKeyPair(prefix: string): Promise<string> {
  const { privateKey, publicKey } = generateKeyPairSync('ed25519');
  const keyPath = `${prefix}.key`;
  const pubPath = `${prefix}.pub`;
  for (const path of [keyPath, pubPath]) {
    if (
      await lstat(path).then(
        () => true,
        () => false,
      )
    )
      throw new FoldsealError(
        {
          ...writeProblem(Object.assign(new Error(), { code: 'EEXIST' }), path),
          hint: 'choose another --out prefix; foldseal never overwrites a key',
        },
        2,
      );
  }
  try {
    await writeFile(keyPath, privateKey.export({ format: 'pem', type: 'pkcs8' }), { flag: 'wx', mode: 0o600 });
    await chmod(keyPath, 0o600);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'EEXIST') await unlink(keyPath).catch(() => undefined);
    throw new FoldsealError(writeProblem(e as NodeJS.ErrnoException, keyPath), 2);
  }
  try {
    await writeFile(pubPath, publicKey.export({ format: 'pem', type: 'spki' }), { flag: 'wx' });
  } catch (e) {
    await unlink(keyPath).catch(() => undefined);
    if ((e as NodeJS.ErrnoException).code !== 'EEXIST') await unlink(pubPath).catch(() => undefined);
    throw new FoldsealError(writeProblem(e as NodeJS.ErrnoException, pubPath), 2);
  }
  return fingerprint(publicKey);
}
