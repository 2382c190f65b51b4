// The split engine's own SHA-256 against FIPS 180-4's examples and against node:crypto (OpenSSL).
import { createHash } from 'node:crypto';
import fc from 'fast-check';
import t from 'tap';
import { deriveKeys, keyMessage, sortByKey } from '../../src/split/key.js';
import { ShortHasher } from '../../src/split/sha256.js';

const hex = (message: Uint8Array) => {
  const out = new Uint8Array(32);
  new ShortHasher().digestInto(message, message.length, out, 0);
  return Buffer.from(out).toString('hex');
};
const enc = (s: string) => new TextEncoder().encode(s);

// NIST's SHA-256 examples ("abc", the 448-bit two-block message) and the empty message; digests
// written from memory, and each is also checked against OpenSSL through node:crypto.
t.test('FIPS 180-4 example messages', async (t) => {
  const cases: [string, string][] = [
    ['abc', 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'],
    ['', 'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855'],
    ['abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq', '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1'],
  ];
  for (const [text, digest] of cases) {
    t.equal(hex(enc(text)), digest, JSON.stringify(text));
    t.equal(createHash('sha256').update(text).digest('hex'), digest, `${JSON.stringify(text)} (node:crypto)`);
  }
});

t.test('same digest as node:crypto for every length around the block boundaries', async (t) => {
  const h = new ShortHasher();
  const out = new Uint8Array(64);
  for (let n = 0; n <= 200; n++) {
    const m = Uint8Array.from({ length: n }, (_, i) => (i * 131 + n) & 0xff);
    h.digestInto(m, n, out, 32);
    if (Buffer.from(out.subarray(32)).toString('hex') !== createHash('sha256').update(m).digest('hex')) t.fail(`length ${n}`);
  }
  fc.assert(
    fc.property(fc.uint8Array({ maxLength: 300 }), (m) => hex(m) === createHash('sha256').update(m).digest('hex')),
    { numRuns: 2000 },
  );
  t.pass('all agreed');
});

t.test('split keys equal SHA-256 of the spec message, ids of any Unicode', async (t) => {
  fc.assert(
    fc.property(
      fc.array(fc.string({ unit: 'binary', maxLength: 40 }), { maxLength: 20 }),
      fc.nat(1e9),
      fc.integer({ min: 1, max: 50 }),
      (ids, seed, repeat) => {
        const keys = deriveKeys(ids, seed, repeat);
        return ids.every((id, i) =>
          Buffer.from(keys.subarray(i * 32, i * 32 + 32)).equals(
            createHash('sha256')
              .update(keyMessage(seed, repeat, id))
              .digest(),
          ),
        );
      },
    ),
    { numRuns: 500 },
  );
  t.pass('agreed');
});

t.test('sorting by key: ties in the first 4 bytes and very large tables fall back to full keys', async (t) => {
  // Synthetic keys: rows 0..5 share their first 4 bytes in pairs and differ later.
  const keys = new Uint8Array(6 * 32);
  const prefixes = [7, 7, 3, 3, 9, 1];
  prefixes.forEach((p, i) => {
    keys[i * 32 + 3] = p;
    keys[i * 32 + 31] = 10 - i;
  });
  const ids = ['a', 'b', 'c', 'd', 'e', 'f'];
  const rows = Int32Array.from([0, 1, 2, 3, 4, 5]);
  const expected = [5, 3, 2, 1, 0, 4]; // prefix 1; prefix 3 by the last byte (row 3 < row 2); prefix 7 likewise; prefix 9
  t.same(Array.from(sortByKey(rows, keys, ids)), expected);
  const huge = Object.assign(new Array<string>(2 ** 21), ids); // as many ids as the packed sort allows
  t.same(Array.from(sortByKey(rows, keys, huge)), expected, 'same order from the comparison sort');
});
