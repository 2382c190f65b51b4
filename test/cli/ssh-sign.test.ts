/**
 * Signing with OpenSSH keys, checked in both directions against stock OpenSSH (Debian's
 * openssh-client): foldseal's manifest.json.sig verifies with `ssh-keygen -Y verify`, a signature
 * made by `ssh-keygen -Y sign` verifies with `foldseal verify`, fingerprints equal `ssh-keygen -l`,
 * and the agent path runs against a real `ssh-agent` started here.
 */
import { spawn, spawnSync } from 'node:child_process';
import { cpSync, existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import {
  encodeSshsig,
  parseKeyLines,
  parseOpensshPrivateKey,
  parseSshsig,
  publicKeyLine,
  sshsigValid,
  SshFormatError,
} from '../../src/manifest/ssh.js';
import { signerMatches } from '../../src/check/gate.js';
import { bin, cli, root, tempDir } from '../helpers.js';

const haveSsh = spawnSync('ssh-keygen', ['-?']).error === undefined;

function project(): string {
  const dir = tempDir();
  cpSync(join(root, 'protocols', 'data'), join(dir, 'data'), { recursive: true });
  writeFileSync(join(dir, 'demo.yaml'), readFileSync(join(root, 'protocols', 'demo.yaml'), 'utf8'));
  return dir;
}

function sshKeygen(args: string[], cwd: string, input?: string) {
  return spawnSync('ssh-keygen', args, { cwd, encoding: 'utf8', input });
}

function keypair(dir: string, name: string, type = 'ed25519', passphrase = ''): void {
  const r = sshKeygen(
    ['-q', '-t', type, ...(type === 'rsa' ? ['-b', '2048'] : []), '-N', passphrase, '-C', `${name}@example.org`, '-f', name],
    dir,
  );
  if (r.status !== 0) throw new Error(r.stderr);
}

const opts = haveSsh ? {} : { skip: 'ssh-keygen (Debian openssh-client) is not installed; .ci/run installs it' };

t.test('a manifest signed with an OpenSSH key file verifies with stock ssh-keygen -Y verify', opts, async (t) => {
  const dir = project();
  keypair(dir, 'alice');
  const r = await cli(['run', 'demo.yaml', '--out', 'res', '--key', 'alice'], dir);
  t.equal(r.code, 0, r.stderr);
  const fp = sshKeygen(['-l', '-f', 'alice.pub'], dir).stdout.split(' ')[1];
  t.match(r.stdout, `(manifest signed with SSH key ${fp} (alice@example.org))`, 'the fingerprint is the one ssh-keygen -l prints');
  writeFileSync(join(dir, 'allowed_signers'), `alice@example.org ${readFileSync(join(dir, 'alice.pub'), 'utf8')}`);
  const manifest = readFileSync(join(dir, 'res', 'manifest.json'));
  const ok = sshKeygen(
    ['-Y', 'verify', '-f', 'allowed_signers', '-I', 'alice@example.org', '-n', 'foldseal-manifest', '-s', 'res/manifest.json.sig'],
    dir,
    manifest.toString('utf8'),
  );
  t.equal(ok.status, 0, ok.stderr);
  t.match(ok.stdout, `Good "foldseal-manifest" signature for alice@example.org with ED25519 key ${fp}`);
  const edited = sshKeygen(
    ['-Y', 'verify', '-f', 'allowed_signers', '-I', 'alice@example.org', '-n', 'foldseal-manifest', '-s', 'res/manifest.json.sig'],
    dir,
    manifest.toString('utf8').replace('"rows":120', '"rows":121'),
  );
  t.not(edited.status, 0, 'ssh-keygen rejects a changed manifest');
  for (const key of ['alice.pub', 'allowed_signers']) {
    const v = await cli(['verify', 'res/manifest.json', '--key', key, '--rerun'], dir);
    t.equal(v.code, 0, v.stderr);
    t.match(
      v.stdout,
      `signature: valid SSH signature (manifest.json.sig), signed by ${fp}${key === 'allowed_signers' ? ' (alice@example.org)' : ''}\n`,
    );
    t.match(v.stdout, /identical\n$/);
  }
  const unpinned = await cli(['verify', 'res/manifest.json'], dir);
  t.equal(unpinned.code, 1);
  t.match(unpinned.stderr, `error: the signature is valid for the key embedded in the manifest (${fp}), but that key is not pinned`);
});

t.test('a signature made by ssh-keygen -Y sign over manifest.json is accepted by foldseal verify', opts, async (t) => {
  const dir = project();
  keypair(dir, 'bob');
  keypair(dir, 'mallory');
  t.equal((await cli(['run', 'demo.yaml', '--out', 'res'], dir)).code, 0);
  const signed = sshKeygen(['-Y', 'sign', '-f', 'bob', '-n', 'foldseal-manifest', 'res/manifest.json'], dir);
  t.equal(signed.status, 0, signed.stderr);
  const v = await cli(['verify', 'res/manifest.json', '--key', 'bob.pub'], dir);
  t.equal(v.code, 0, v.stderr);
  t.match(v.stdout, /verified\n$/);
  const wrong = await cli(['verify', 'res/manifest.json', '--key', 'mallory.pub'], dir);
  t.equal(wrong.code, 1);
  t.match(wrong.stderr, 'error: manifest.json.sig is signed by key SHA256:');
  const original = readFileSync(join(dir, 'res', 'manifest.json'), 'utf8');
  writeFileSync(join(dir, 'res', 'manifest.json'), original.replace('"rows":120', '"rows":121'));
  const tampered = await cli(['verify', 'res/manifest.json', '--key', 'bob.pub'], dir);
  t.equal(tampered.code, 1);
  t.match(tampered.stderr, 'manifest.json.sig does not match the bytes of manifest.json');
  writeFileSync(join(dir, 'res', 'manifest.json'), original);
  // A signature made for another purpose (namespace "file") is not a manifest signature.
  rmSync(join(dir, 'res', 'manifest.json.sig'));
  t.equal(sshKeygen(['-Y', 'sign', '-f', 'bob', '-n', 'file', 'res/manifest.json'], dir).status, 0);
  const other = await cli(['verify', 'res/manifest.json', '--key', 'bob.pub'], dir);
  t.equal(other.code, 1);
  t.match(other.stderr, 'manifest.json.sig is a signature for namespace "file", not "foldseal-manifest"');
});

t.test('signing through a real ssh-agent: the private key never reaches foldseal', opts, async (t) => {
  const dir = project();
  keypair(dir, 'carol');
  const sock = join(dir, 'agent.sock');
  const agent = spawn('ssh-agent', ['-D', '-a', sock], { stdio: 'ignore' });
  try {
    // Up to 15 s for the agent's socket: a busy CI machine can be slow to start it.
    for (let i = 0; i < 750 && !existsSync(sock); i++) await new Promise((r) => setTimeout(r, 20));
    t.ok(existsSync(sock), 'the agent is listening');
    const env = { ...process.env, SSH_AUTH_SOCK: sock };
    const runWith = (args: string[], e: NodeJS.ProcessEnv) =>
      spawnSync(process.execPath, [bin, ...args], { cwd: dir, encoding: 'utf8', env: e });
    const empty = runWith(['run', 'demo.yaml', '--out', 'res', '--key', 'carol.pub'], env);
    t.equal(empty.status, 2, 'the agent does not hold the key yet');
    t.match(empty.stderr, 'carol.pub: error: signing through ssh-agent failed: the agent does not hold the key SHA256:');
    t.notOk(existsSync(join(dir, 'res')), 'nothing written');
    t.equal(spawnSync('ssh-add', ['-q', 'carol'], { cwd: dir, env }).status, 0);
    const r = runWith(['run', 'demo.yaml', '--out', 'res', '--key', 'carol.pub'], env);
    t.equal(r.status, 0, r.stderr);
    t.match(r.stdout, '(through ssh-agent)');
    writeFileSync(
      join(dir, 'allowed_signers'),
      `carol@example.org namespaces="foldseal-manifest" ${readFileSync(join(dir, 'carol.pub'), 'utf8')}`,
    );
    const ok = sshKeygen(
      ['-Y', 'verify', '-f', 'allowed_signers', '-I', 'carol@example.org', '-n', 'foldseal-manifest', '-s', 'res/manifest.json.sig'],
      dir,
      readFileSync(join(dir, 'res', 'manifest.json'), 'utf8'),
    );
    t.equal(ok.status, 0, ok.stderr);
    t.equal((await cli(['verify', 'res/manifest.json', '--key', 'allowed_signers'], dir)).code, 0);
    const { SSH_AUTH_SOCK: _drop, ...noAgent } = env;
    void _drop;
    const none = runWith(['run', 'demo.yaml', '--out', 'res2', '--key', 'carol.pub'], noAgent);
    t.equal(none.status, 2);
    t.match(none.stderr, 'needs ssh-agent, but SSH_AUTH_SOCK is not set');
  } finally {
    agent.kill();
  }
});

t.test('keys foldseal does not sign with are refused by name', opts, async (t) => {
  const dir = project();
  keypair(dir, 'locked', 'ed25519', 'a passphrase');
  keypair(dir, 'rsa', 'rsa');
  const enc = await cli(['run', 'demo.yaml', '--out', 'res', '--key', 'locked'], dir);
  t.equal(enc.code, 2);
  t.match(enc.stderr, 'locked: error: locked is protected by a passphrase (aes256-ctr); foldseal never asks for passphrases');
  t.match(enc.stderr, 'hint: load it into your agent (ssh-add locked) and pass the public key: --key locked.pub');
  const rsa = await cli(['run', 'demo.yaml', '--out', 'res', '--key', 'rsa'], dir);
  t.equal(rsa.code, 2);
  t.match(rsa.stderr, 'rsa is a ssh-rsa key; foldseal signs with Ed25519 keys only');
  t.equal((await cli(['run', 'demo.yaml', '--out', 'res'], dir)).code, 0);
  sshKeygen(['-Y', 'sign', '-f', 'rsa', '-n', 'foldseal-manifest', 'res/manifest.json'], dir);
  const v = await cli(['verify', 'res/manifest.json', '--allow-unpinned'], dir);
  t.equal(v.code, 1);
  t.match(v.stderr, 'manifest.json.sig is made with a ssh-rsa key; foldseal verifies Ed25519 signatures only');
  const pin = await cli(['verify', 'res/manifest.json', '--key', 'rsa.pub'], dir);
  t.equal(pin.code, 2);
  t.match(pin.stderr, 'rsa.pub holds no Ed25519 key usable for foldseal manifests (ssh-rsa)');
  t.notOk(existsSync(join(dir, 'res', 'unexpected')));
});

t.test('the team policy accepts OpenSSH fingerprints and key lines as signers', opts, async (t) => {
  const dir = project();
  keypair(dir, 'dana');
  const pub = readFileSync(join(dir, 'dana.pub'), 'utf8').trim();
  const fp = sshKeygen(['-l', '-f', 'dana.pub'], dir).stdout.split(' ')[1];
  t.equal((await cli(['run', 'demo.yaml', '--out', 'results/demo', '--key', 'dana'], dir)).code, 0);
  t.equal((await cli(['lock', '.'], dir)).code, 0);
  const lockPath = join(dir, 'foldseal.lock.json');
  const lock = JSON.parse(readFileSync(lockPath, 'utf8'));
  for (const [signer, code] of [
    [fp, 0],
    [`dana@example.org ${pub}`, 0],
    [pub, 0],
    ['SHA256:' + 'A'.repeat(43), 1],
  ] as const) {
    lock.policy = { signers: [signer] };
    writeFileSync(lockPath, JSON.stringify(lock));
    const r = await cli(['check', '.'], dir);
    t.equal(r.code, code, `${signer.slice(0, 30)}: ${r.stderr}`);
  }
});

t.test('SSH formats: key lines, allowed_signers options, SSHSIG parsing errors', async (t) => {
  const raw = Buffer.alloc(32, 7);
  const line = publicKeyLine(raw, 'x@y');
  const parsed = parseKeyLines(
    `# comment\n\n${line}\nann,bo namespaces="git,foldseal-manifest",valid-after="20260101" ${line}\n* cert-authority ${line}\nnot a key\n`,
  );
  t.same(
    parsed.keys.map((k) => [k.line, k.principals ?? null, k.namespaces ?? null, k.certAuthority ?? false]),
    [
      [3, null, null, false],
      [4, ['ann', 'bo'], ['git', 'foldseal-manifest'], false],
      [5, ['*'], null, true],
    ],
  );
  t.same(parsed.problems, [
    { line: 6, message: 'is not a public key line (TYPE BASE64 [comment]) nor an allowed_signers line (PRINCIPALS [OPTIONS] TYPE BASE64)' },
  ]);
  t.same(parseKeyLines(line.replace('ssh-ed25519 ', 'ssh-rsa ')).problems[0].message, 'names type ssh-rsa but holds a ssh-ed25519 key');
  t.match(parseKeyLines('ssh-ed25519 AAAA').problems[0].message, 'holds a malformed key');
  t.ok(signerMatches(`p ${line}`, (await import('node:crypto')).createHash('sha256').update(raw).digest('hex'), undefined));
  for (const [text, message] of [
    ['hello', 'it is not an armoured SSH signature'],
    ['-----BEGIN SSH SIGNATURE-----\n!!!\n-----END SSH SIGNATURE-----', 'its body is not base64'],
    ['-----BEGIN SSH SIGNATURE-----\nQUJDREVGAAAAAQ==\n-----END SSH SIGNATURE-----', 'it does not start with SSHSIG'],
    ['-----BEGIN SSH SIGNATURE-----\nU1NIU0lHAAAAAg==\n-----END SSH SIGNATURE-----', 'it is SSHSIG version 2'],
    ['-----BEGIN SSH SIGNATURE-----\nU1NIU0lHAAAAAQAAAP8=\n-----END SSH SIGNATURE-----', 'a length runs past the end of the data'],
  ]) {
    t.throws(() => parseSshsig(text), new SshFormatError(message), message);
  }
  const wrapped = encodeSshsig(
    Buffer.concat([Buffer.from([0, 0, 0, 11]), Buffer.from('ssh-ed25519'), Buffer.from([0, 0, 0, 32]), raw]),
    'foldseal-manifest',
    'sha512',
    Buffer.concat([Buffer.from([0, 0, 0, 11]), Buffer.from('ssh-ed25519'), Buffer.from([0, 0, 0, 64]), Buffer.alloc(64)]),
  );
  t.ok(
    wrapped
      .split('\n')
      .slice(1, -2)
      .every((l) => l.length <= 70),
    'armour lines of 70 characters at most, as ssh-keygen writes them',
  );
  t.notOk(sshsigValid(parseSshsig(wrapped), Buffer.from('x')), 'an all-zero signature is not valid');
  t.throws(() => parseOpensshPrivateKey('nothing'), new SshFormatError('it is not an OpenSSH private key'));
});
