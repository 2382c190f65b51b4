/**
 * Prints the test vectors of docs/split-spec.md from foldseal's implementation.
 * Run: node --import ./test/reference/ts-loader.mjs ... (or via tap's loader) — the output is pasted
 * into the spec; test/split/spec-vectors.test.ts then checks the document, not this script.
 */
import { assignFolds } from '../../src/split/assign.js';
import { assignmentCsv } from '../../src/split/csv.js';
import { deriveKeys, keyMessage } from '../../src/split/key.js';
import { compareUtf8 } from '../../src/util/bytes.js';
import type { SpecVector } from '../split/vectors.js';

type Vector = Omit<SpecVector, 'expected'>;

const letters = 'abcdefghij'.split('');
const vectors: Vector[] = [
  { name: 'kfold-balanced', rule: 'kfold', folds: 3, seed: 1, rows: letters.map((l) => [l, 'x']) },
  { name: 'kfold-stable', rule: 'kfold', folds: 3, seed: 1, assign: 'stable', rows: letters.map((l) => [l, 'x']) },
  {
    name: 'stratified-balanced-3-classes-2-repeats',
    rule: 'stratified-kfold',
    folds: 3,
    seed: 42,
    repeats: 2,
    rows: ['s01:x', 's02:x', 's03:x', 's04:x', 's05:x', 's06:y', 's07:y', 's08:y', 's09:y', 's10:z', 's11:z', 's12:z'].map((s) =>
      s.split(':'),
    ),
  },
  {
    name: 'stratified-stable',
    rule: 'stratified-kfold',
    folds: 2,
    seed: 5,
    assign: 'stable',
    rows: ['p1:no', 'p2:no', 'p3:yes', 'p4:yes', 'p5:no', 'p6:yes', 'p7:no', 'p8:yes'].map((s) => s.split(':')),
  },
  {
    name: 'grouped-balanced',
    rule: 'grouped-kfold',
    folds: 3,
    seed: 9,
    rows: [
      'r01:x:A',
      'r02:y:A',
      'r03:x:A',
      'r04:y:A',
      'r05:x:B',
      'r06:y:B',
      'r07:x:B',
      'r08:x:C',
      'r09:y:C',
      'r10:x:D',
      'r11:y:D',
      'r12:y:E',
    ].map((s) => s.split(':')),
  },
  {
    name: 'grouped-stable',
    rule: 'grouped-kfold',
    folds: 3,
    seed: 9,
    assign: 'stable',
    rows: [
      'r01:x:A',
      'r02:y:A',
      'r03:x:A',
      'r04:y:A',
      'r05:x:B',
      'r06:y:B',
      'r07:x:B',
      'r08:x:C',
      'r09:y:C',
      'r10:x:D',
      'r11:y:D',
      'r12:y:E',
    ].map((s) => s.split(':')),
  },
  {
    name: 'holdout-balanced',
    rule: 'holdout',
    seed: 3,
    'test-fraction': 0.3,
    rows: ['h01:a', 'h02:a', 'h03:a', 'h04:a', 'h05:a', 'h06:a', 'h07:b', 'h08:b', 'h09:b', 'h10:b'].map((s) => s.split(':')),
  },
  {
    name: 'holdout-stable',
    rule: 'holdout',
    seed: 3,
    'test-fraction': 0.25,
    assign: 'stable',
    rows: ['h01:a', 'h02:a', 'h03:a', 'h04:a', 'h05:a', 'h06:a', 'h07:b', 'h08:b', 'h09:b', 'h10:b'].map((s) => s.split(':')),
  },
  { name: 'leave-one-out-byte-order', rule: 'leave-one-out', rows: ['é:x', 'Z:y', 'a:x', '10:y', '9:x'].map((s) => s.split(':')) },
  {
    name: 'leave-group-out',
    rule: 'leave-group-out',
    rows: ['u1:x:site-b', 'u2:y:site-a', 'u3:x:site-c', 'u4:y:site-a', 'u5:x:site-b', 'u6:y:site-c'].map((s) => s.split(':')),
  },
  {
    name: 'kfold-unicode-ids',
    rule: 'kfold',
    folds: 2,
    seed: 0,
    rows: [
      ['caf\u00e9', 'x'],
      ['cafe\u0301', 'x'],
      ['日本', 'x'],
      ['\u{1F331}', 'x'],
      ['plain', 'x'],
      ['\uFF21', 'x'],
    ],
  },
  {
    name: 'kfold-largest-seed-3-repeats',
    rule: 'kfold',
    folds: 2,
    seed: 9007199254740991,
    repeats: 3,
    rows: ['m1', 'm2', 'm3', 'm4', 'm5'].map((s) => [s, 'x']),
  },
];

const out = vectors.map((v) => {
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
  );
  return { ...v, expected: assignmentCsv(a).trimEnd().split('\n').slice(1) };
});

const keyVectors = [
  { seed: 0, repeat: 1, id: 'a' },
  { seed: 20261201, repeat: 2, id: 'CS-0001' },
  { seed: 1, repeat: 1, id: 'caf\u00e9' },
].map((k) => ({
  ...k,
  message: keyMessage(k.seed, k.repeat, k.id).toString('hex'),
  key: Buffer.from(deriveKeys([k.id], k.seed, k.repeat)).toString('hex'),
}));

process.stdout.write(JSON.stringify({ keys: keyVectors, vectors: out }, null, 1) + '\n');
