import { spawnSync } from 'node:child_process';
import { createPrivateKey, createPublicKey, generateKeyPairSync, sign, verify } from 'node:crypto';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import canonicalize from 'canonicalize';
import fc from 'fast-check';
import t from 'tap';
import { canonicalBytes, canonicalJson, CanonicalText, NonJsonValueError } from '../../src/manifest/canonical.js';
import { rawPublicKey, signingBytes } from '../../src/manifest/sign.js';
import { tempDir } from '../helpers.js';

// RFC 8785 Appendix B, "Number Serialization Samples": IEEE 754 binary64 bit patterns and the
// canonical text. Transcribed from the RFC's table (the same 24 rows appear in several
// independent test suites; the RFC is the source).
const APPENDIX_B: [string, string][] = [
  ['0000000000000000', '0'],
  ['8000000000000000', '0'],
  ['0000000000000001', '5e-324'],
  ['8000000000000001', '-5e-324'],
  ['7fefffffffffffff', '1.7976931348623157e+308'],
  ['ffefffffffffffff', '-1.7976931348623157e+308'],
  ['4340000000000000', '9007199254740992'],
  ['c340000000000000', '-9007199254740992'],
  ['4430000000000000', '295147905179352830000'],
  ['44b52d02c7e14af5', '9.999999999999997e+22'],
  ['44b52d02c7e14af6', '1e+23'],
  ['44b52d02c7e14af7', '1.0000000000000001e+23'],
  ['444b1ae4d6e2ef4e', '999999999999999700000'],
  ['444b1ae4d6e2ef4f', '999999999999999900000'],
  ['444b1ae4d6e2ef50', '1e+21'],
  ['3eb0c6f7a0b5ed8c', '9.999999999999997e-7'],
  ['3eb0c6f7a0b5ed8d', '0.000001'],
  ['41b3de4355555553', '333333333.3333332'],
  ['41b3de4355555554', '333333333.33333325'],
  ['41b3de4355555555', '333333333.3333333'],
  ['41b3de4355555556', '333333333.3333334'],
  ['41b3de4355555557', '333333333.33333343'],
  ['becbf647612f3696', '-0.0000033333333333333333'],
  ['43143ff3c1cb0959', '1424953923781206.2'],
];
const fromBits = (hex: string) => Buffer.from(hex, 'hex').readDoubleBE(0);

t.test('RFC 8785 Appendix B number serialization samples', async (t) => {
  for (const [bits, text] of APPENDIX_B) t.equal(canonicalJson(fromBits(bits)), text, bits);
  // The appendix's NaN and Infinity rows have no JSON form: foldseal refuses them before writing.
  t.throws(() => canonicalJson({ score: fromBits('7fffffffffffffff') }), NonJsonValueError);
  t.throws(() => canonicalJson([fromBits('7ff0000000000000')]), { message: 'value at /0 is Infinity, which has no JSON form' });
});

// RFC 8785 §3.2.4 (and §3.2.3 sorting): the document's own worked example of the whole transformation.
t.test('RFC 8785 §3.2.4 example', async (t) => {
  const input = JSON.parse(
    '{"numbers": [333333333.33333329, 1E30, 4.50, 2e-3, 0.000000000000000000000000001], "string": ' +
      '"\\u20ac$\\u000F\\u000aA\'\\u0042\\u0022\\u005c\\\\\\"\\/", "literals": [null, true, false]}',
  );
  t.equal(
    canonicalJson(input),
    '{"literals":[null,true,false],"numbers":[333333333.3333333,1e+30,4.5,0.002,1e-27],"string":"€$\\u000f\\nA\'B\\"\\\\\\\\\\"/"}',
  );
});

// RFC 8785 §3.2.3, the property-sorting example (names compared as UTF-16 code units; an astral
// character's surrogates sort before U+FB33). Transcribed from memory of the RFC's example.
t.test('RFC 8785 §3.2.3 sorting example', async (t) => {
  const input = {
    '\u20ac': 'Euro Sign',
    '\r': 'Carriage Return',
    '\ufb33': 'Hebrew Letter Dalet With Dagesh',
    '1': 'One',
    '\ud83d\ude00': 'Emoji: Grinning Face',
    '\u0080': 'Control',
    '\u00f6': 'Latin Small Letter O With Diaeresis',
  };
  const order = ['\r', '1', '\u0080', '\u00f6', '\u20ac', '\ud83d\ude00', '\ufb33'] as const;
  t.equal(canonicalJson(input), `{${order.map((k) => `${JSON.stringify(k)}:${JSON.stringify(input[k])}`).join(',')}}`);
});

// Reference library: the `canonicalize` package (an independent RFC 8785 implementation, a dev
// dependency only) must write the same bytes for any JSON value.
t.test('same bytes as the canonicalize package on generated JSON', async (t) => {
  fc.assert(
    fc.property(fc.jsonValue(), (v) => canonicalJson(v) === canonicalize(v)),
    { numRuns: 3000 },
  );
  fc.assert(
    fc.property(
      fc.array(fc.tuple(fc.string({ unit: 'binary' }), fc.integer(), fc.double({ noNaN: true, noDefaultInfinity: true }))),
      (v) => canonicalJson(v) === canonicalize(v),
    ),
    { numRuns: 500 },
  );
  t.throws(() => canonicalJson({ a: [[1, NaN]] }), { message: 'value at /a/0/1 is NaN, which has no JSON form' });
  t.throws(() => canonicalJson({ a: [{ b: undefined }] }), { message: 'value at /a/0/b is undefined, which has no JSON form' });
  t.throws(() => canonicalJson([new Date(0)]), { message: 'value at /0 is object, which has no JSON form' });
});

t.test('spliced canonical pieces (text, bytes or a writer) give the bytes the whole value gives', async (t) => {
  // Reference: the canonicalize package on the same value with the piece as plain JSON.
  fc.assert(
    fc.property(
      fc.dictionary(fc.string(), fc.jsonValue()),
      fc.jsonValue(),
      fc.constantFrom('text', 'bytes', 'writer'),
      (outer, inner, kind) => {
        const text = canonicalize(inner)!;
        const bytes = Buffer.from(text);
        const spliced =
          kind === 'text'
            ? new CanonicalText(text)
            : kind === 'bytes'
              ? new CanonicalText(bytes)
              : new CanonicalText((out) => out.append(bytes), kind === 'writer' ? bytes.length : 0);
        const whole = canonicalize({ ...outer, piece: inner })!;
        const value = { ...outer, piece: spliced };
        return canonicalJson(value) === whole && Buffer.from(canonicalBytes(value, '\n')).equals(Buffer.from(`${whole}\n`));
      },
    ),
    { numRuns: 1000 },
  );
  t.pass('1,000 generated values');
});

// RFC 8032 §7.1, TEST 1 (the empty message), from the RFC's text.
const SECRET = '9d61b19deffd5a60ba844af492ec2cc44449c5697b326919703bac031cae7f60';
const PUBLIC = 'd75a980182b10ab7d54bfed3c964073a0ee172f3daa62325af021a68f707511a';
const SIGNATURE =
  'e5564300c360ac729086e2cc806e828a84877f1eb8e5d974d873e065224901555fb8821590a33bacc61e39701cf9b46bd25bf5f0595bbe24655141438e7a100b';

t.test('RFC 8032 §7.1 test 1 through node:crypto', async (t) => {
  // PKCS#8 wrapping of a raw Ed25519 seed (RFC 8410): fixed 16-byte prefix, then the 32 bytes.
  const key = createPrivateKey({
    key: Buffer.concat([Buffer.from('302e020100300506032b657004220420', 'hex'), Buffer.from(SECRET, 'hex')]),
    format: 'der',
    type: 'pkcs8',
  });
  const pub = createPublicKey(key);
  t.equal(rawPublicKey(pub).toString('hex'), PUBLIC);
  const signature = sign(null, Buffer.alloc(0), key);
  t.equal(signature.toString('hex'), SIGNATURE);
  t.ok(verify(null, Buffer.alloc(0), pub, signature));
  t.notOk(verify(null, Buffer.from([0]), pub, signature));
});

const haveOpenssl = spawnSync('openssl', ['version']).status === 0;
t.test(
  'an independent check: openssl pkeyutl verifies a manifest signature',
  { skip: haveOpenssl ? false : 'openssl is not installed (apt-get install openssl)' },
  async (t) => {
    const { privateKey, publicKey } = generateKeyPairSync('ed25519');
    const manifest = { 'foldseal-manifest': 1, results: { accuracy: 0.9375 }, note: 'é' };
    const bytes = signingBytes(manifest);
    const dir = tempDir({
      'msg.bin': bytes,
      'sig.bin': sign(null, bytes, privateKey),
      'pub.pem': publicKey.export({ type: 'spki', format: 'pem' }) as string,
    });
    const ok = spawnSync(
      'openssl',
      ['pkeyutl', '-verify', '-pubin', '-inkey', 'pub.pem', '-rawin', '-in', 'msg.bin', '-sigfile', 'sig.bin'],
      { cwd: dir, encoding: 'utf8' },
    );
    t.equal(ok.status, 0, ok.stderr + ok.stdout);
    t.match(ok.stdout, 'Signature Verified Successfully');
    writeFileSync(join(dir, 'msg.bin'), Buffer.concat([bytes, Buffer.from(' ')]));
    const bad = spawnSync(
      'openssl',
      ['pkeyutl', '-verify', '-pubin', '-inkey', 'pub.pem', '-rawin', '-in', 'msg.bin', '-sigfile', 'sig.bin'],
      { cwd: dir, encoding: 'utf8' },
    );
    t.not(bad.status, 0, 'a changed message fails');
  },
);
