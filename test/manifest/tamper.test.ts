/** Signed manifests against tampering (fast-check): every mutation must be rejected. */
import { generateKeyPairSync, type KeyObject } from 'node:crypto';
import { join } from 'node:path';
import fc from 'fast-check';
import t from 'tap';
import { produceRun } from '../../src/io/produce-run.js';
import { assignmentTriples, assignmentTriplesJson } from '../../src/manifest/build.js';
import { canonicalJson } from '../../src/manifest/canonical.js';
import { type Assignment, SPLIT_VERSION } from '../../src/split/assignment.js';
import { checkManifest } from '../../src/manifest/check.js';
import { manifestForRun } from '../../src/run/manifest-of-run.js';
import { rawPublicKey } from '../../src/manifest/sign.js';
import { root } from '../helpers.js';
import { MANIFEST_SCHEMA, schemaValidator } from '../../src/io/schemas.js';

const validate = schemaValidator(MANIFEST_SCHEMA);

const keyA = generateKeyPairSync('ed25519');
const keyB = generateKeyPairSync('ed25519');
const tool = { name: 'foldseal' as const, version: '0.0.0-test', node: 'v20', platform: 'test' };
const { input, out } = await produceRun(join(root, 'protocols', 'demo.yaml'));
const { text } = manifestForRun(input!, out!, {
  tool,
  created: '2026-12-01T00:00:00.000Z',
  protocolLocation: '../protocols',
  key: keyA,
  validate,
});
const pin = (k: { publicKey: KeyObject }) => [{ raw: rawPublicKey(k.publicKey) }];
const rejected = (s: string, publicKey = keyA.publicKey) =>
  checkManifest(s, { file: 'm.json', pinned: pin({ publicKey }), validate }).problems.some((p) => p.severity === 'error');

type Path = (string | number)[];
function paths(value: unknown, prefix: Path = [], out: Path[] = []): Path[] {
  if (value !== null && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      const p = [...prefix, Array.isArray(value) ? Number(k) : k];
      out.push(p);
      paths(v, p, out);
    }
  }
  return out;
}
const base = JSON.parse(text);
const all = paths(base);
const get = (o: any, p: Path) => p.reduce((x, k) => x[k], o);
const set = (o: any, p: Path, v: unknown) => {
  get(o, p.slice(0, -1))[p[p.length - 1]] = v;
};

t.test('written with its assignment as text (run), the signed manifest is the same bytes', async (t) => {
  const lean = manifestForRun(input!, out!, {
    tool,
    created: '2026-12-01T00:00:00.000Z',
    protocolLocation: '../protocols',
    key: keyA,
    validate,
    textOnly: true,
  });
  t.equal(lean.text, text);
  t.same(checkManifest(lean.text, { file: 'm.json', pinned: pin(keyA), validate }).problems, []);
});

t.test('the assignment written directly is JSON.stringify of its triples, for any ids (fast-check)', async (t) => {
  fc.assert(
    fc.property(
      fc.uniqueArray(fc.string(), { minLength: 0, maxLength: 20 }),
      fc.integer({ min: 1, max: 3 }),
      fc.infiniteStream(fc.integer({ min: 0, max: 9 })),
      (ids, repeats, folds) => {
        const it = folds[Symbol.iterator]();
        const fold = Int32Array.from({ length: ids.length * repeats }, () => it.next().value as number);
        const a: Assignment = { version: SPLIT_VERSION, ids, repeats, folds: 9, fold };
        return Buffer.from(assignmentTriplesJson(a)).equals(Buffer.from(JSON.stringify(assignmentTriples(a))));
      },
    ),
  );
  t.pass('100 generated assignments');
});

t.test('the untouched manifest verifies with key A and fails with key B', async (t) => {
  t.same(checkManifest(text, { file: 'm.json', pinned: pin(keyA), validate }).problems, []);
  const withB = checkManifest(text, { file: 'm.json', pinned: pin(keyB), validate });
  t.same(
    withB.problems.map((p) => p.code),
    ['signature-wrong-key'],
  );
});

t.test('1,200 generated mutations: none is accepted', async (t) => {
  let tried = 0;
  const bytes = Buffer.from(text, 'utf8');
  fc.assert(
    fc.property(fc.nat(bytes.length - 1), fc.integer({ min: 1, max: 255 }), (i, delta) => {
      const b = Buffer.from(bytes);
      b[i] = (b[i] + delta) % 256;
      tried++;
      return rejected(b.toString('utf8'));
    }),
    { numRuns: 2000 },
  );
  fc.assert(
    fc.property(fc.constantFrom(...all), (p) => {
      const m = structuredClone(base);
      const parent = get(m, p.slice(0, -1));
      if (Array.isArray(parent)) parent.splice(p[p.length - 1] as number, 1);
      else delete parent[p[p.length - 1]];
      tried++;
      return rejected(canonicalJson(m) + '\n');
    }),
    { numRuns: 300 },
  );
  fc.assert(
    fc.property(fc.constantFrom(...all), fc.constantFrom(...all), (p, q) => {
      const m = structuredClone(base);
      const a = get(m, p);
      const b = get(m, q);
      fc.pre(canonicalJson(a) !== canonicalJson(b) && !p.join('/').startsWith(q.join('/')) && !q.join('/').startsWith(p.join('/')));
      set(m, p, structuredClone(b));
      set(m, q, structuredClone(a));
      tried++;
      return rejected(canonicalJson(m) + '\n');
    }),
    { numRuns: 300 },
  );
  t.ok(tried >= 1000, `${tried} mutations tried, all rejected`);
});

t.test('a changed value is named by its member path', async (t) => {
  const m = structuredClone(base);
  m.results.summary.accuracy.mean = 0.99;
  const problems = checkManifest(canonicalJson(m) + '\n', { file: 'm.json', pinned: pin(keyA), validate }).problems;
  t.same(
    problems.map((p) => p.message),
    ['the signature does not match the content: /results/summary changed after signing'],
  );
  const reformatted = JSON.stringify(base, null, 2);
  t.same(
    checkManifest(reformatted, { file: 'm.json', pinned: pin(keyA), validate }).problems.map((p) => p.code),
    ['manifest-not-canonical'],
    'a pretty-printed copy is flagged, its signature still holds',
  );
});

t.test('bad manifests', async (t) => {
  const codes = (s: string) => checkManifest(s, { file: 'm.json', validate }).problems.map((p) => p.code);
  t.same(codes(text.slice(0, 200)), ['manifest-not-json'], 'truncated');
  t.same(codes('[1,2]'), ['manifest-not-object']);
  t.same(codes(text.replace(/"accuracy":0\.\d+/, '"accuracy":1e999')), ['manifest-not-json'], 'a number that overflows to Infinity');
  t.same(codes(text.replace('"foldseal-manifest":1', '"foldseal-manifest":2')), ['manifest-version']);
  t.same(codes(text.replace('"created":', '"extra":1,"created":')), ['manifest-schema']);
  const unsigned = structuredClone(base);
  delete unsigned.signature;
  t.same(codes(canonicalJson(unsigned) + '\n'), ['manifest-unsigned']);
  t.same(
    checkManifest(canonicalJson(unsigned) + '\n', { file: 'm.json', allowUnpinned: true, validate }).problems.map((p) => p.severity),
    ['warning'],
  );
  t.same(codes(text), ['signature-unpinned'], 'valid but unpinned without --key');
  const forged = structuredClone(base);
  forged.signature['key-sha256'] = '0'.repeat(64);
  t.ok(codes(canonicalJson(forged) + '\n').includes('signature-key-mismatch'));
  // The last base64 character of the 32-byte key carries 2 spare bits: a change there decodes to
  // the same key, and must still be caught.
  const spare = structuredClone(base);
  const key: string = spare.signature['public-key'];
  const last = key[key.length - 2];
  const alphabet = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';
  spare.signature['public-key'] = key.slice(0, -2) + alphabet[alphabet.indexOf(last) ^ 1] + '=';
  t.same(codes(canonicalJson(spare) + '\n'), ['signature-encoding']);
});
