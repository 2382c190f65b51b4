import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import t from 'tap';
import { assignFolds } from '../../src/split/assign.js';
import { assignmentCsv } from '../../src/split/csv.js';
import { deriveKeys, keyMessage } from '../../src/split/key.js';
import { compareUtf8 } from '../../src/util/bytes.js';
import { cli, root, sha256, tempDir } from '../helpers.js';
import { specInnerKeyVectors, specKeyVectors, specVectors, type SpecVector } from './vectors.js';

export function runVector(v: SpecVector): string[] {
  const ids = v.rows.map((r) => r[0]);
  const classes = [...new Set(v.rows.map((r) => r[1]))].sort(compareUtf8);
  const y = Int32Array.from(v.rows.map((r) => classes.indexOf(r[1])));
  const groups = v.rows[0].length > 2 ? v.rows.map((r) => r[2]) : undefined;
  const a = assignFolds(
    { ids, y, classCount: classes.length, groups },
    {
      rule: v.rule,
      folds: v.folds ?? 5,
      repeats: v.repeats ?? 1,
      seed: v.seed,
      assign: v.assign ?? 'balanced',
      testFraction: v['test-fraction'],
    },
    v.outer && { repeat: v.outer[0], fold: v.outer[1] },
  );
  return assignmentCsv(a).trimEnd().split('\n').slice(1);
}

const all = specVectors();
const vectors = all.filter((v) => v.expected);
const rejected = all.filter((v) => v.reject);

t.test('the spec has at least 10 vectors covering every rule and both modes', async (t) => {
  t.ok(vectors.length >= 10);
  t.same(
    new Set(vectors.map((v) => v.rule)),
    new Set(['holdout', 'kfold', 'stratified-kfold', 'grouped-kfold', 'leave-one-out', 'leave-group-out']),
  );
  t.ok(vectors.some((v) => v.assign === 'stable'));
});

for (const v of vectors) {
  t.test(`spec vector ${v.name}`, async (t) => t.same(runVector(v), v.expected));
}

// §8: inputs the spec rejects are refused by foldseal with the named problem, on a real data file.
t.test('spec §8 rejection vectors are refused with their problem code', async (t) => {
  t.ok(rejected.length >= 5);
  for (const v of rejected) {
    const grouped = v.rows[0].length > 2;
    const csv =
      [`id,label,${grouped ? 'g,' : ''}a`, ...v.rows.map((r, i) => `${r[0]},${r[1]},${grouped ? `${r[2]},` : ''}${i}`)].join('\n') + '\n';
    const split = JSON.stringify({
      rule: v.rule,
      ...(v.folds ? { folds: v.folds } : {}),
      ...(v.seed !== undefined ? { seed: v.seed } : {}),
      ...(v.assign ? { assign: v.assign } : {}),
      ...(v['test-fraction'] ? { 'test-fraction': v['test-fraction'] } : {}),
    });
    const dir = tempDir({
      'data.csv': csv,
      'p.yaml':
        `foldseal: 1\nname: v\ndata: {file: data.csv, sha256: "${sha256(csv)}", id: id, label: ` +
        `label${grouped ? ', group: g' : ''}}\nsplit: ${split}\nmodel: {kind: gaussian-nb}\n`,
    });
    const r = await cli(['validate', 'p.yaml', '--format', 'json'], dir);
    t.equal(r.code, 1, v.name);
    t.ok(
      (JSON.parse(r.stdout) as { code: string }[]).some((p) => p.code === v.reject),
      `${v.name}: ${r.stdout}`,
    );
  }
});

// Reference: the key derivation vectors of spec §2; the first was also confirmed with coreutils
// `printf 'foldseal/split-v1\x000\x001\x00a' | sha256sum` when the spec was written.
t.test('key derivation vectors of spec §2', async (t) => {
  for (const k of specKeyVectors()) {
    t.equal(keyMessage(k.seed, k.repeat, k.id).toString('hex'), k.message);
    t.equal(Buffer.from(deriveKeys([k.id], k.seed, k.repeat)).toString('hex'), k.key);
  }
});

// Reference: spec §9's inner key vectors; the first was also confirmed with coreutils
// `printf 'foldseal/split-v1\x007\x001.3.2\x00a' | sha256sum` when §9 was written.
t.test('inner key derivation vectors of spec §9', async (t) => {
  const inner = specInnerKeyVectors();
  t.ok(inner.length >= 2);
  t.ok(vectors.filter((v) => v.outer).length >= 4, 'inner split vectors');
  for (const k of inner) {
    t.equal(keyMessage(k.seed, k.repeat, k.id).toString('hex'), k.message);
    t.equal(Buffer.from(deriveKeys([k.id], k.seed, k.repeat)).toString('hex'), k.key);
  }
});

// Outside check: an implementation of the spec in Python (hashlib + integers) written from the document.
const python = spawnSync('python3', ['--version']).status === 0;
t.test(
  'an independent Python implementation of the spec agrees on every vector',
  { skip: python ? false : 'python3 not installed' },
  async (t) => {
    const r = spawnSync('python3', [join(root, 'test', 'reference', 'split_v1.py')], { input: JSON.stringify(all), encoding: 'utf8' });
    t.equal(r.status, 0, r.stderr);
    const got = JSON.parse(r.stdout) as Record<string, string[] | { reject: string }>;
    for (const v of vectors) t.same(got[v.name], v.expected, v.name);
    for (const v of rejected) t.same(got[v.name], { reject: v.reject }, v.name);
  },
);
