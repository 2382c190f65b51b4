/** Ed25519 key files at the edge: PKCS#8 PEM private keys (mode 0600) and SPKI PEM public keys. */
import { createPrivateKey, createPublicKey, generateKeyPairSync, type KeyObject } from 'node:crypto';
import { chmod, lstat, unlink, writeFile } from 'node:fs/promises';
import { error, FoldsealError } from '../problems/problem.js';
import { fingerprint } from '../manifest/sign.js';
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

export async function readPrivateKey(path: string): Promise<{ privateKey: KeyObject; publicKey: KeyObject }> {
  const pem = await readPem(path);
  if (/-----BEGIN PUBLIC KEY-----/.test(pem)) throw keyError(path, `${path} is a public key; signing needs the private key`, 'pass the .key file that foldseal keygen wrote, not the .pub');
  let key: KeyObject;
  try {
    key = createPrivateKey(pem);
  } catch {
    throw keyError(path, `${path} is not a PEM private key`);
  }
  if (key.asymmetricKeyType !== 'ed25519') throw keyError(path, `${path} is a ${key.asymmetricKeyType} key; foldseal signs with Ed25519`, 'make one with foldseal keygen');
  return { privateKey: key, publicKey: createPublicKey(key) };
}

export async function readPublicKey(path: string): Promise<KeyObject> {
  const pem = await readPem(path);
  if (/-----BEGIN (ENCRYPTED |)PRIVATE KEY-----/.test(pem)) throw keyError(path, `${path} is a private key; verifying needs only the public key`, 'pass the .pub file, and keep the .key file to yourself');
  let key: KeyObject;
  try {
    key = createPublicKey(pem);
  } catch {
    throw keyError(path, `${path} is not a PEM public key`);
  }
  if (key.asymmetricKeyType !== 'ed25519') throw keyError(path, `${path} is a ${key.asymmetricKeyType} key; foldseal manifests are signed with Ed25519`);
  return key;
}

/** Writes PREFIX.key (mode 0600) and PREFIX.pub: both or neither, never over an existing file. */
export async function writeKeyPair(prefix: string): Promise<string> {
  const { privateKey, publicKey } = generateKeyPairSync('ed25519');
  const keyPath = `${prefix}.key`;
  const pubPath = `${prefix}.pub`;
  for (const path of [keyPath, pubPath]) {
    if (await lstat(path).then(() => true, () => false)) throw new FoldsealError({ ...writeProblem(Object.assign(new Error(), { code: 'EEXIST' }), path), hint: 'choose another --out prefix; foldseal never overwrites a key' }, 2);
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
