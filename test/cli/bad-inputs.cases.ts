/**
 * The table of bad inputs: each a file set, a command, the exit code and a message pattern.
 * Run by bad-inputs-a.test.ts and bad-inputs-b.test.ts (half each, so each file stays quick).
 * Exit codes: 0 fine, 1 the input is invalid or differs, 2 usage or unreadable input, never 3.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { sha256, smallCsv } from '../helpers.js';

export interface BadInput {
  name: string;
  files?: Record<string, string | Uint8Array>;
  setup?: (dir: string) => void;
  args: string[];
  exit: 0 | 1 | 2;
  /** Matched against stderr + stdout. */
  match: string | RegExp;
}

const csv = smallCsv(20);
const h = sha256(csv);
const data = (file = 'data.csv', hash = h, extra = '') => `data: {file: ${file}, sha256: "${hash}", id: id, label: label${extra}}`;
const protocol = (over: { data?: string; split?: string; model?: string; extra?: string } = {}) =>
  [
    'foldseal: 1',
    'name: t',
    over.data ?? data(),
    over.split ?? 'split: {rule: stratified-kfold, folds: 2, seed: 7}',
    over.model ?? 'model: {kind: gaussian-nb}',
    over.extra ?? '',
  ].join('\n') + '\n';

/** A protocol over `text` as data.csv (hash filled in). */
const withData = (
  text: string | Uint8Array,
  over: { split?: string; model?: string; extra?: string; dataExtra?: string } = {},
): Record<string, string | Uint8Array> => ({
  'data.csv': text,
  'p.yaml': protocol({
    data: data('data.csv', sha256(text), over.dataExtra ?? ''),
    split: over.split,
    model: over.model,
    extra: over.extra,
  }),
});
const validate = ['validate', 'p.yaml'];
const rows = (body: string) => `id,label,g,a,b,c\n${body}`;
const good = (n: number) =>
  Array.from({ length: n }, (_, i) => `r${i + 1},${i % 2 ? 'x' : 'y'},G${i % 5},${i + 1},${(i * 7) % 11},${(i * 3) % 5}.5`).join('\n') +
  '\n';

export const badInputs: BadInput[] = [
  // The protocol file itself.
  { name: 'protocol file missing', args: ['validate', 'nope.yaml'], exit: 2, match: 'file nope.yaml does not exist' },
  { name: 'protocol is a folder', setup: (d) => mkdirSync(join(d, 'p.yaml')), args: validate, exit: 2, match: 'is a folder, not a file' },
  {
    name: 'protocol with another ending',
    files: { 'p.txt': protocol() },
    args: ['validate', 'p.txt'],
    exit: 2,
    match: 'does not end in .yaml, .yml or .json',
  },
  { name: 'empty protocol', files: { 'p.yaml': '' }, args: validate, exit: 1, match: 'a protocol is a YAML mapping' },
  {
    name: 'YAML syntax error',
    files: { 'p.yaml': 'foldseal: 1\nname: [unclosed\n' },
    args: validate,
    exit: 1,
    match: /p\.yaml:\d+:\d+: error:/,
  },
  {
    name: 'duplicate key',
    files: { 'p.yaml': 'foldseal: 1\nfoldseal: 1\n' },
    args: validate,
    exit: 1,
    match: 'appears twice in the same mapping',
  },
  {
    name: 'undefined alias',
    files: { 'p.yaml': 'foldseal: 1\nname: *nope\n' },
    args: validate,
    exit: 1,
    match: 'the alias *nope refers to an anchor that is not defined',
  },
  {
    name: 'alias bomb',
    files: {
      'p.yaml':
        'a: &a [x,x,x,x,x,x,x,x,x,x]\nb: &b [*a,*a,*a,*a,*a,*a,*a,*a,*a,*a]\nc: &c [*b,*b,*b,*b,*b,*b,*b,*b,*b,*b]\nd: ' +
        '[*c,*c,*c,*c,*c,*c,*c,*c,*c,*c]\n',
    },
    args: validate,
    exit: 1,
    match: 'aliases expand past the limit',
  },
  {
    name: 'YAML nested 20,000 levels',
    files: { 'p.yaml': 'foldseal: 1\nx: ' + '['.repeat(20000) + ']'.repeat(20000) + '\n' },
    args: validate,
    exit: 1,
    match: 'brackets nest more than 64 levels deep',
  },
  {
    name: 'protocol over 1 MiB',
    files: { 'p.yaml': protocol() + '#'.repeat(1 << 20) + '\n' },
    args: validate,
    exit: 2,
    match: 'is larger than 1 MiB',
  },
  {
    name: 'protocol of binary bytes',
    files: { 'p.yaml': new Uint8Array([0x1f, 0x8b, 0, 0, 0xff, 0xfe, 0]) },
    args: validate,
    exit: 1,
    match: /error:/,
  },
  {
    name: 'protocol is a JSON array',
    files: { 'p.json': '[1, 2]' },
    args: ['validate', 'p.json'],
    exit: 1,
    match: 'a protocol is a YAML mapping',
  },
  {
    name: 'unknown format version',
    files: { ...withData(csv), 'p.yaml': protocol().replace('foldseal: 1', 'foldseal: 2') },
    args: validate,
    exit: 1,
    match: /p\.yaml:1:\d+: error:/,
  },
  {
    name: 'misspelt top-level key',
    files: { ...withData(csv), 'p.yaml': protocol({ extra: 'metrcs: [accuracy]' }) },
    args: validate,
    exit: 1,
    match: /unknown key "metrcs"[\s\S]*did you mean `metrics`/,
  },
  {
    name: 'no data section',
    files: { 'p.yaml': 'foldseal: 1\nname: t\nsplit: {rule: kfold, folds: 2, seed: 1}\nmodel: {kind: gaussian-nb}\n' },
    args: validate,
    exit: 1,
    match: /data/,
  },
  {
    name: 'unknown model kind',
    files: withData(csv, { model: 'model: {kind: random-forest}' }),
    args: validate,
    exit: 1,
    match: /p\.yaml:5:\d+: error:/,
  },
  {
    name: 'unknown model option',
    files: withData(csv, { model: 'model: {kind: knn, options: {neighbours: 3}}' }),
    args: validate,
    exit: 1,
    match: /neighbours/,
  },
  { name: 'unknown metric', files: withData(csv, { extra: 'metrics: [acuracy]' }), args: validate, exit: 1, match: /acuracy/ },
  { name: 'one fold', files: withData(csv, { split: 'split: {rule: kfold, folds: 1, seed: 1}' }), args: validate, exit: 1, match: /folds/ },
  {
    name: 'folds above the bound',
    files: withData(csv, { split: 'split: {rule: kfold, folds: 100000, seed: 1}' }),
    args: validate,
    exit: 1,
    match: 'split.folds must be ≤ 1000',
  },
  {
    name: 'repeats above the bound',
    files: withData(csv, { split: 'split: {rule: kfold, folds: 2, repeats: 5000, seed: 1}' }),
    args: validate,
    exit: 1,
    match: 'split.repeats must be ≤ 1000',
  },
  {
    name: 'zero repeats',
    files: withData(csv, { split: 'split: {rule: kfold, folds: 2, repeats: 0, seed: 1}' }),
    args: validate,
    exit: 1,
    match: /repeats/,
  },
  {
    name: 'negative seed',
    files: withData(csv, { split: 'split: {rule: kfold, folds: 2, seed: -3}' }),
    args: validate,
    exit: 1,
    match: 'split.seed must be ≥ 0',
  },
  {
    name: 'fractional seed',
    files: withData(csv, { split: 'split: {rule: kfold, folds: 2, seed: 1.5}' }),
    args: validate,
    exit: 1,
    match: 'split.seed must be an integer',
  },
  {
    name: 'seed beyond 2^53 − 1',
    files: withData(csv, { split: 'split: {rule: kfold, folds: 2, seed: 9007199254740993}' }),
    args: validate,
    exit: 1,
    match: /seed/,
  },
  {
    name: 'no seed for a keyed rule',
    files: withData(csv, { split: 'split: {rule: kfold, folds: 2}' }),
    args: validate,
    exit: 1,
    match: 'draws its folds from a seed, and none is given',
  },
  {
    name: 'test fraction above 1',
    files: withData(csv, { split: 'split: {rule: holdout, test-fraction: 1.5, seed: 1}' }),
    args: validate,
    exit: 1,
    match: /test-fraction/,
  },
  {
    name: 'holdout with an empty test part',
    files: withData(csv, { split: 'split: {rule: holdout, test-fraction: 0.01, seed: 1}' }),
    args: validate,
    exit: 1,
    match: 'leaves the test part empty',
  },
  {
    name: 'stratified folds above a class size',
    files: withData(csv, { split: 'split: {rule: stratified-kfold, folds: 11, seed: 7}' }),
    args: validate,
    exit: 1,
    match: 'fewer than the 11 folds',
  },
  {
    name: 'more folds than rows',
    files: withData(rows(good(4)), { split: 'split: {rule: kfold, folds: 5, seed: 1}' }),
    args: validate,
    exit: 1,
    match: 'folds is 5 but the data has only 4 rows',
  },
  {
    name: 'a stable split with an empty fold',
    files: withData('id,label,a\na,x,1\nb,y,2\nc,x,3\nd,y,4\n', { split: 'split: {rule: kfold, folds: 3, seed: 0, assign: stable}' }),
    args: validate,
    exit: 1,
    match: 'the split leaves 1 fold without a row',
  },
  {
    name: 'grouped rule without a group column',
    files: withData(csv, { split: 'split: {rule: grouped-kfold, folds: 2, seed: 1}' }),
    args: validate,
    exit: 1,
    match: 'needs data.group',
  },
  {
    name: 'leave-group-out with one group',
    files: withData('id,label,g,a\nr1,x,A,1\nr2,y,A,2\n', { split: 'split: {rule: leave-group-out}', dataExtra: ', group: g' }),
    args: validate,
    exit: 1,
    match: 'leave-group-out needs at least 2 groups',
  },
  {
    name: 'leave-one-out with repeats',
    files: withData(csv, { split: 'split: {rule: leave-one-out, repeats: 2}' }),
    args: validate,
    exit: 1,
    match: 'repeats must be 1',
  },
  {
    name: 'majority vote that can tie, no tie rule',
    files: withData(csv, { extra: 'reconcile: {rule: majority-vote}' }),
    args: validate,
    exit: 1,
    match: 'can tie',
  },
  {
    name: 'malformed sha256',
    files: { 'data.csv': csv, 'p.yaml': protocol({ data: data('data.csv', 'abc') }) },
    args: validate,
    exit: 1,
    match: /sha256/,
  },
  // The data file.
  { name: 'data file missing', files: { 'p.yaml': protocol() }, args: validate, exit: 1, match: 'file data.csv does not exist' },
  {
    name: 'data hash mismatch is the only problem',
    files: { 'data.csv': 'garbage,"\nmore', 'p.yaml': protocol() },
    args: validate,
    exit: 1,
    match: /^p\.yaml:3:\d+: error: the data file's SHA-256 is [0-9a-f]{64}, not the/,
  },
  {
    name: 'data is a folder',
    setup: (d) => mkdirSync(join(d, 'data.csv')),
    files: { 'p.yaml': protocol() },
    args: validate,
    exit: 1,
    match: 'is a folder, not a file',
  },
  {
    name: 'data is a FIFO',
    setup: (d) => {
      spawnSync('mkfifo', [join(d, 'data.csv')]);
    },
    files: { 'p.yaml': protocol() },
    args: validate,
    exit: 1,
    match: 'is not a regular file (a FIFO)',
  },
  {
    name: 'data is /dev/zero',
    files: { 'p.yaml': protocol({ data: data('/dev/zero') }) },
    args: [...validate, '--allow-outside'],
    exit: 1,
    match: 'is not a regular file (a device)',
  },
  {
    name: 'data outside the folder',
    files: { 'p.yaml': protocol({ data: data('../../etc/hostname') }) },
    args: validate,
    exit: 1,
    match: 'lies outside the folder foldseal may read',
  },
  {
    name: 'gzip-compressed data is read as its text',
    files: withData(gzipSync(csv)),
    args: validate,
    exit: 0,
    match: 'valid (0 errors',
  },
  {
    name: 'truncated gzip data',
    files: withData(gzipSync(csv).subarray(0, 30)),
    args: validate,
    exit: 1,
    match: 'starts like a gzip file but cannot be decompressed',
  },
  {
    name: 'zip archive as data',
    files: withData(new Uint8Array([0x50, 0x4b, 0x03, 0x04, 1, 2, 3])),
    args: validate,
    exit: 1,
    match: 'looks like a zip archive file',
  },
  {
    name: 'Parquet file as data',
    files: withData(new Uint8Array([0x50, 0x41, 0x52, 0x31, 1, 2, 3])),
    args: validate,
    exit: 1,
    match: 'looks like a Parquet file',
  },
  {
    name: 'binary data with NUL bytes',
    files: withData(new Uint8Array([0x69, 0x64, 0x0a, 0, 1, 2])),
    args: validate,
    exit: 1,
    match: 'holds NUL bytes',
  },
  {
    name: 'invalid UTF-8 in an id',
    files: withData(Buffer.concat([Buffer.from('id,label,a\nr1,x,1\nr'), Buffer.from([0xff]), Buffer.from('2,y,2\n')])),
    args: validate,
    exit: 1,
    match: 'data.csv:3:2: error: byte 20 (0xff) is not valid UTF-8',
  },
  { name: 'header only', files: withData('id,label,a\n'), args: validate, exit: 1, match: 'has a header but no data rows' },
  { name: 'empty data file', files: withData(''), args: validate, exit: 1, match: /error:/ },
  { name: 'ragged row', files: withData('id,label,a\nr1,x,1\nr2,y\n'), args: validate, exit: 1, match: /data\.csv:3:\d+: error: .*cells/ },
  {
    name: 'unterminated quote',
    files: withData('id,label,a\nr1,x,1\n"r2,y,2\n'),
    args: validate,
    exit: 1,
    match: /data\.csv:3:\d+: error:/,
  },
  {
    name: 'duplicate header column',
    files: withData('id,label,a,a\nr1,x,1,2\nr2,y,2,3\n'),
    args: validate,
    exit: 1,
    match: 'column "a" appears more than once',
  },
  {
    name: 'id column missing',
    files: withData('ident,label,a\nr1,x,1\nr2,y,2\n'),
    args: validate,
    exit: 1,
    match: 'column "id" (data.id) is not in the data file\'s header',
  },
  {
    name: 'label column missing',
    files: withData('id,class,a\nr1,x,1\nr2,y,2\n'),
    args: validate,
    exit: 1,
    match: 'column "label" (data.label) is not in the data file\'s header',
  },
  {
    name: 'missing columns reported first',
    files: withData('ident,label,a\nr1,x,1\nr2,y,oops\n'),
    args: validate,
    exit: 1,
    match: /^p\.yaml:\d+:\d+: error: column "id" \(data\.id\)/,
  },
  {
    name: 'duplicate id',
    files: withData('id,label,a\nr1,x,1\nr1,y,2\nr3,x,3\nr4,y,4\n'),
    args: validate,
    exit: 1,
    match: 'id "r1" appears again',
  },
  {
    name: 'empty id',
    files: withData('id,label,a\nr1,x,1\n,y,2\nr3,x,3\nr4,y,4\n'),
    args: validate,
    exit: 1,
    match: 'row 2 has an empty id',
  },
  {
    name: 'missing label',
    files: withData('id,label,a\nr1,x,1\nr2,,2\nr3,x,3\nr4,y,4\n'),
    args: validate,
    exit: 1,
    match: 'row 2 has no label',
  },
  { name: 'one class', files: withData('id,label,a\nr1,x,1\nr2,x,2\nr3,x,3\n'), args: validate, exit: 1, match: 'at least 2 are needed' },
  {
    name: 'a cell of 1e400',
    files: withData('id,label,a\nr1,x,1e400\nr2,y,2\nr3,x,3\nr4,y,4\n'),
    args: validate,
    exit: 1,
    match: 'data.csv:2:6: error: cell "1e400" in column "a" (row 1) is beyond the range of a double-precision number',
  },
  {
    name: 'a cell of -1e400',
    files: withData('id,label,a\nr1,x,-1e400\nr2,y,2\nr3,x,3\nr4,y,4\n'),
    args: validate,
    exit: 1,
    match: 'is beyond the range of a double-precision number',
  },
  {
    name: 'a cell near 1e300',
    files: withData('id,label,a\nr1,x,1e300\nr2,y,2\nr3,x,3\nr4,y,4\n'),
    args: validate,
    exit: 1,
    match: 'is outside the range foldseal computes with safely',
  },
  {
    name: 'a cell near 1e-300',
    files: withData('id,label,a\nr1,x,1e-300\nr2,y,2\nr3,x,3\nr4,y,4\n'),
    args: validate,
    exit: 1,
    match: 'is outside the range foldseal computes with safely',
  },
  {
    name: 'an Infinity cell',
    files: withData('id,label,a\nr1,x,1\nr2,y,Infinity\nr3,x,3\nr4,y,4\n'),
    args: validate,
    exit: 1,
    match: 'data.csv:3:6: error: cell "Infinity" in column "a" (row 2) is not a number',
  },
  {
    name: 'a NaN cell is missing, with no impute step',
    files: withData('id,label,a\nr1,x,1\nr2,y,NaN\nr3,x,3\nr4,y,4\n'),
    args: validate,
    exit: 1,
    match: 'has 1 missing cell and no impute step fills them',
  },
  {
    name: 'a typo in the first data row',
    files: withData('id,label,a,b\nr1,x,1..2,2\nr2,y,2,3\nr3,x,3,4\nr4,y,4,5\n'),
    args: validate,
    exit: 1,
    match: 'data.csv:2:6: error: cell "1..2" in column "a" (row 1) is not a number',
  },
  {
    name: 'a comma as decimal separator',
    files: withData('id,label,a\nr1,x,"1,5"\nr2,y,2\nr3,x,3\nr4,y,4\n'),
    args: validate,
    exit: 1,
    match: 'use a dot as the decimal separator',
  },
  {
    name: 'an all-missing column',
    files: withData('id,label,a,b\nr1,x,,1\nr2,y,NA,2\nr3,x,,3\nr4,y,,4\n'),
    args: validate,
    exit: 0,
    match: 'column "a" has no value in any row (every cell is missing)',
  },
  {
    name: 'no numeric feature',
    files: withData('id,label,a\nr1,x,p\nr2,y,q\n'),
    args: validate,
    exit: 1,
    match: 'no numeric feature columns were found',
  },
  {
    name: 'a listed feature not in the file',
    files: withData(csv, { dataExtra: ', features: [a, zz]' }),
    args: validate,
    exit: 1,
    match: 'feature column "zz" is not in the data file\'s header',
  },
  {
    name: 'the label listed as a feature',
    files: withData(csv, { dataExtra: ', features: [a, label]' }),
    args: validate,
    exit: 1,
    match: 'cannot also be a feature',
  },
  {
    name: 'an excluded column not in the file',
    files: withData(csv, { dataExtra: ', features: {exclude: [zz]}' }),
    args: validate,
    exit: 0,
    match: 'excluded column "zz" is not in the data file\'s header',
  },
  {
    name: 'empty group cells',
    files: withData('id,label,g,a\nr1,x,A,1\nr2,y,,2\nr3,x,B,3\nr4,y,B,4\n', {
      split: 'split: {rule: grouped-kfold, folds: 2, seed: 7}',
      dataExtra: ', group: g',
    }),
    args: validate,
    exit: 1,
    match: 'row 2 has an empty group cell',
  },
  {
    name: 'CR-only line ends are line ends',
    files: withData(csv.replaceAll('\n', '\r')),
    args: ['folds', 'p.yaml'],
    exit: 0,
    match: 'split-v1: 20 ids',
  },
  { name: 'a byte-order mark at the start', files: withData('\ufeff' + csv), args: validate, exit: 0, match: 'valid (0 errors' },
  // Pinned assignments and new rows.
  {
    name: 'pinned file missing',
    files: withData(csv, { split: `split: {pinned: {file: f.csv, sha256: "${'0'.repeat(64)}"}}` }),
    args: validate,
    exit: 1,
    match: 'file f.csv does not exist',
  },
  {
    name: 'pinned file changed',
    files: { ...withData(csv, { split: `split: {pinned: {file: f.csv, sha256: "${'0'.repeat(64)}"}}` }), 'f.csv': 'id,repeat,fold\n' },
    args: validate,
    exit: 1,
    match: "the pinned file's SHA-256 is",
  },
  {
    name: 'pinned file lacking an id',
    files: (() => {
      const f =
        'id,repeat,fold\n' +
        Array.from({ length: 19 }, (_, i) => `r${i + 1},1,${(i % 2) + 1}`)
          .sort()
          .join('\n') +
        '\n';
      return { ...withData(csv, { split: `split: {pinned: {file: f.csv, sha256: "${sha256(f)}"}}` }), 'f.csv': f };
    })(),
    args: validate,
    exit: 1,
    match: /r20/,
  },
  {
    name: 'new-rows file missing',
    files: withData(csv, { extra: `reconcile: {rule: mean-probability, new-rows: {file: n.csv, sha256: "${'0'.repeat(64)}"}}` }),
    args: validate,
    exit: 1,
    match: 'file n.csv does not exist',
  },
  {
    name: 'new rows lacking a feature',
    files: (() => {
      const n = 'id,a,b\nn1,1,2\n';
      return {
        ...withData(csv, { extra: `reconcile: {rule: mean-probability, new-rows: {file: n.csv, sha256: "${sha256(n)}"}}` }),
        'n.csv': n,
      };
    })(),
    args: validate,
    exit: 1,
    match: 'feature "c" is not in the new-rows file\'s header',
  },
  {
    name: 'a new row under a training id',
    files: (() => {
      const n = 'id,a,b,c\nr1,99,99,99\n';
      return {
        ...withData(csv, { extra: `reconcile: {rule: mean-probability, new-rows: {file: n.csv, sha256: "${sha256(n)}"}}` }),
        'n.csv': n,
      };
    })(),
    args: validate,
    exit: 1,
    match: 'n.csv:2:1: error: new row "r1" has the id of a row of the cross-validation',
  },
  // Commands and their outputs.
  {
    name: 'run into a folder foldseal did not write',
    files: { ...withData(csv), 'notes.txt': 'mine' },
    args: ['run', 'p.yaml', '--out', '.', '--force'],
    exit: 2,
    match: 'so foldseal will not replace it',
  },
  {
    name: 'run with constant features gives no NaN',
    files: withData('id,label,a\n' + Array.from({ length: 12 }, (_, i) => `r${i},${i % 2 ? 'x' : 'y'},3`).join('\n') + '\n'),
    args: ['run', 'p.yaml', '--out', 'res'],
    exit: 0,
    match: /log-loss\s+0\.6931/,
  },
  {
    name: 'run with a missing key file',
    files: withData(csv),
    args: ['run', 'p.yaml', '--out', 'res', '--key', 'nope.key'],
    exit: 2,
    match: 'file nope.key does not exist',
  },
  {
    name: 'run signing with a public key',
    files: {
      ...withData(csv),
      'k.pub': '-----BEGIN PUBLIC KEY-----\nMCowBQYDK2VwAyEA11qYAYKxCrfVS/7TyWQHOg7hcvPapiMlrwIaaPcHURo=\n-----END PUBLIC KEY-----\n',
    },
    args: ['run', 'p.yaml', '--out', 'res', '--key', 'k.pub'],
    exit: 2,
    match: 'is a public key; signing needs the private key',
  },
  {
    name: 'folds --out an existing folder',
    setup: (d) => mkdirSync(join(d, 'outdir')),
    files: withData(csv),
    args: ['folds', 'p.yaml', '--out', 'outdir'],
    exit: 2,
    match: 'outdir is a folder; give a file name',
  },
  {
    name: 'folds --out into a missing folder',
    files: withData(csv),
    args: ['folds', 'p.yaml', '--out', 'no/such/f.csv'],
    exit: 2,
    match: 'the folder no/such does not exist',
  },
  {
    name: 'keygen into a missing folder',
    args: ['keygen', '--out', 'no/dir/k'],
    exit: 2,
    match: 'no/dir/k.key cannot be written: the folder no/dir does not exist',
  },
  { name: 'keygen over an existing key', files: { 'k.key': 'x' }, args: ['keygen', '--out', 'k'], exit: 2, match: 'k.key already exists' },
  { name: 'check a missing folder', args: ['check', 'no-such-folder'], exit: 2, match: 'no-such-folder does not exist' },
  { name: 'check a file', files: { 'f.txt': 'x' }, args: ['check', 'f.txt'], exit: 2, match: 'f.txt is not a folder' },
  { name: 'check --staged outside git', args: ['check', '--staged', '.'], exit: 2, match: 'is not a git repository' },
  { name: 'lock /proc/self', args: ['lock', '/proc/self'], exit: 2, match: '/proc/self/foldseal.lock.json cannot be written' },
  {
    name: 'a corrupt lock',
    files: { 'foldseal.lock.json': '{"foldseal-lock": 1' },
    args: ['check', '.'],
    exit: 2,
    match: 'the lock is not valid JSON',
  },
  { name: 'verify a missing manifest', args: ['verify', 'm.json'], exit: 2, match: 'file m.json does not exist' },
  {
    name: 'verify a manifest that is not JSON',
    files: { 'm.json': '{not json' },
    args: ['verify', 'm.json'],
    exit: 1,
    match: 'the manifest is not JSON',
  },
  {
    name: 'verify a manifest nested 100,000 levels',
    files: { 'm.json': '{"a":'.repeat(100000) + '1' + '}'.repeat(100000) },
    args: ['verify', 'm.json'],
    exit: 1,
    match: 'the manifest nests more than 64 levels deep',
  },
  {
    name: 'apply from a missing results folder',
    files: { 'n.csv': 'id,a\n1,2\n' },
    args: ['apply', 'nope', 'n.csv'],
    exit: 2,
    match: 'does not exist',
  },
  // audit, report, run --shard and merge.
  { name: 'audit of a missing protocol', args: ['audit', 'nope.yaml'], exit: 2, match: 'file nope.yaml does not exist' },
  {
    name: 'audit of a protocol whose data changed',
    files: { ...withData(csv), 'data.csv': csv.replace('r1,', 'r0,') },
    args: ['audit', 'p.yaml'],
    exit: 1,
    match: "the data file's SHA-256 is",
  },
  {
    name: 'report of a folder without results',
    setup: (d) => mkdirSync(join(d, 'done')),
    args: ['report', 'done'],
    exit: 2,
    match: 'results.json',
  },
  {
    name: 'report of a results.json from another format',
    files: { 'done/results.json': '{"foldseal-results": 9}', 'done/manifest.json': '{}' },
    args: ['report', 'done'],
    exit: 1,
    match: 'this foldseal reads format 1',
  },
  { name: 'run --shard not I/N', files: withData(csv), args: ['run', 'p.yaml', '--shard', '3of4'], exit: 2, match: '--shard must be I/N' },
  { name: 'run --shard 0/4', files: withData(csv), args: ['run', 'p.yaml', '--shard', '0/4'], exit: 2, match: '--shard must be I/N' },
  {
    name: 'merge without parts',
    files: withData(csv),
    args: ['merge', 'p.yaml'],
    exit: 2,
    match: /missing required argument 'parts'/,
  },
  {
    name: 'merge of a part that is not JSON',
    files: { ...withData(csv), 'part.json': 'half a part' },
    args: ['merge', 'p.yaml', 'part.json', '--out', 'res'],
    exit: 1,
    match: 'part.json is not a shard part (not JSON',
  },
  {
    name: 'merge of a missing part file',
    files: withData(csv),
    args: ['merge', 'p.yaml', 'gone.json', '--out', 'res'],
    exit: 1,
    match: 'gone.json',
  },
  { name: 'an unknown command', args: ['frobnicate'], exit: 2, match: /unknown command/ },
  { name: 'an unknown option', args: ['validate', '--frob', 'p.yaml'], exit: 2, match: /unknown option/ },
];
