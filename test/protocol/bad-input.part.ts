/**
 * Every bad input of the foundation issue, through the built binary: the exact located
 * message, exit 1, and nothing written. Expected texts are foldseal's own contract.
 */
import t, { type Test } from 'tap';
import { cli, expectValidation, protocolText, sha256, smallCsv, tempDir } from '../helpers.js';

const csv = smallCsv();
const h = sha256(csv);

function check(t: Test, name: string, files: Record<string, string>, expected: string[], code = 1) {
  expectValidation(t, name, { 'data.csv': csv, ...files }, expected, code);
}

check(t, 'malformed YAML', { 'p.yaml': 'foldseal: 1\nname: [t\n' }, [
  'p.yaml:3:1: error: Flow sequence in block collection must be sufficiently indented and end with a ]',
]);
check(t, 'a duplicate key', { 'p.yaml': protocolText(csv).replace('name: t\n', 'name: t\nname: u\n') }, [
  'p.yaml:3:1: error: key "name" appears twice in the same mapping',
]);
check(t, 'a wrong type', { 'p.yaml': protocolText(csv, { split: 'split:\n  rule: kfold\n  folds: five\n  seed: 7' }) }, [
  'p.yaml:10:10: error: split.folds must be an integer, not a string',
]);
check(t, 'an unknown key with a suggestion', { 'p.yaml': protocolText(csv, { extra: 'metrix: [accuracy]' }) }, [
  'p.yaml:13:1: error: unknown key "metrix" in the protocol',
  '  hint: did you mean `metrics`?',
]);
check(t, 'an unknown nested key', { 'p.yaml': protocolText(csv, { split: 'split:\n  rule: kfold\n  fold: 3\n  seed: 7' }) }, [
  'p.yaml:10:3: error: unknown key "fold" in split',
  '  hint: did you mean `folds`?',
]);
check(t, 'an unknown enum value', { 'p.yaml': protocolText(csv, { split: 'split:\n  rule: stratified-kfolds\n  folds: 2\n  seed: 7' }) }, [
  'p.yaml:9:9: error: "stratified-kfolds" is not an allowed value of split.rule',
  '  hint: did you mean `stratified-kfold`?',
]);
check(t, 'a misspelt preprocessing step', { 'p.yaml': protocolText(csv, { extra: 'preprocess: [standardise]' }) }, [
  'p.yaml:13:14: error: "standardise" is not an allowed value of preprocess[0]',
  '  hint: did you mean `standardize`?',
]);
check(t, 'a missing required field', { 'p.yaml': protocolText(csv, { data: `data:\n  file: data.csv\n  sha256: "${h}"\n  id: id` }) }, [
  'p.yaml:3:1: error: data is missing the required field "label"',
]);
check(t, 'folds: 1', { 'p.yaml': protocolText(csv, { split: 'split:\n  rule: kfold\n  folds: 1\n  seed: 7' }) }, [
  'p.yaml:10:10: error: split.folds must be ≥ 2, not 1',
]);
check(t, 'a wrong data hash', { 'p.yaml': protocolText(csv).replace(h, '0'.repeat(64)) }, [
  `p.yaml:5:11: error: the data file's SHA-256 is ${h}, not the ${'0'.repeat(64)} this protocol records`,
  '  hint: if the data changed on purpose, put the new hash here (`foldseal hash FILE`)',
]);
check(t, 'a malformed hash', { 'p.yaml': protocolText(csv).replace(h, 'ABC') }, [
  'p.yaml:5:11: error: "ABC" is not a valid data.sha256',
  '  hint: expected 64 lower-case hex digits; `foldseal hash FILE` prints it',
]);
check(t, 'a missing data file', { 'p.yaml': protocolText(csv).replace('file: data.csv', 'file: nope.csv') }, [
  'p.yaml:4:9: error: file nope.csv does not exist',
]);
check(t, 'an empty data file', { 'p.yaml': protocolText(''), 'data.csv': '' }, ['data.csv:1:1: error: the data file is empty']);
check(t, 'a header-only data file', { 'p.yaml': protocolText('id,label,a\n'), 'data.csv': 'id,label,a\n' }, [
  'data.csv:1:1: error: the data file has a header but no data rows',
]);
const dup = 'id,label,a\nr1,x,1\nr2,y,2\nr1,x,3\nr4,y,4\n';
check(t, 'duplicate ids', { 'p.yaml': protocolText(dup), 'data.csv': dup }, [
  'data.csv:4:1: error: id "r1" appears again (first on line 2)',
]);
const emptyId = 'id,label,a\nr1,x,1\n,y,2\nr3,x,3\nr4,y,4\n';
check(t, 'an empty id', { 'p.yaml': protocolText(emptyId), 'data.csv': emptyId }, ['data.csv:3:1: error: row 2 has an empty id']);
const badCell = 'id,label,a,b\nr1,x,1,2\nr2,y,2,"1,5"\nr3,x,3,12abc\nr4,y,4,5\n';
check(t, 'non-numeric feature cells', { 'p.yaml': protocolText(badCell), 'data.csv': badCell }, [
  'data.csv:3:9: error: cell "1,5" in column "b" (row 2) is not a number',
  '  hint: use a dot as the decimal separator',
  'data.csv:4:8: error: cell "12abc" in column "b" (row 3) is not a number',
]);
const oneClass = 'id,label,a\nr1,x,1\nr2,x,2\nr3,x,3\n';
check(t, 'a label with one class', { 'p.yaml': protocolText(oneClass), 'data.csv': oneClass }, [
  'p.yaml:7:10: error: the label column "label" has 1 class ("x"); at least 2 are needed',
]);
check(
  t,
  'stratified k larger than the smallest class',
  { 'p.yaml': protocolText(csv, { split: 'split:\n  rule: stratified-kfold\n  folds: 11\n  seed: 7' }) },
  [
    'p.yaml:10:10: error: class "x" has 10 rows, fewer than the 11 folds, so some folds would have none of it',
    '  hint: use at most 10 folds',
  ],
);
check(
  t,
  'a YAML alias bomb',
  {
    'p.yaml':
      'a: &a [x,x,x,x,x,x,x,x,x,x]\nb: &b [*a,*a,*a,*a,*a,*a,*a,*a,*a,*a]\nc: &c [*b,*b,*b,*b,*b,*b,*b,*b,*b,*b]\nd: ' +
      '[*c,*c,*c,*c,*c,*c,*c,*c,*c,*c]\n',
  },
  ['p.yaml:2:8: error: aliases expand past the limit of 100 (a resource-exhaustion guard)'],
);

// Split issue's bad inputs.
check(t, 'a missing seed for a randomised rule', { 'p.yaml': protocolText(csv, { split: 'split:\n  rule: kfold\n  folds: 2' }) }, [
  'p.yaml:8:1: error: split rule kfold draws its folds from a seed, and none is given',
]);
check(t, 'a negative seed', { 'p.yaml': protocolText(csv, { split: 'split:\n  rule: kfold\n  folds: 2\n  seed: -3' }) }, [
  'p.yaml:11:9: error: split.seed must be ≥ 0, not -3',
]);
check(t, 'a non-integer seed', { 'p.yaml': protocolText(csv, { split: 'split:\n  rule: kfold\n  folds: 2\n  seed: 1.5' }) }, [
  'p.yaml:11:9: error: split.seed must be an integer, not a number',
]);
check(
  t,
  'more folds than groups',
  {
    'p.yaml': protocolText(csv, {
      data: `data:\n  file: data.csv\n  sha256: "${h}"\n  id: id\n  label: label\n  group: g`,
      split: 'split:\n  rule: grouped-kfold\n  folds: 6\n  seed: 7',
    }),
  },
  ['p.yaml:11:10: error: folds is 6 but the data has only 5 groups'],
);
const emptyGroup = 'id,label,g,a\nr1,x,A,1\nr2,y,,2\nr3,x,B,3\nr4,y,B,4\n';
check(
  t,
  'a group column with empty cells',
  {
    'data.csv': emptyGroup,
    'p.yaml': protocolText(emptyGroup, {
      data: `data:\n  file: data.csv\n  sha256: "${sha256(emptyGroup)}"\n  id: id\n  label: label\n  group: g`,
      split: 'split:\n  rule: grouped-kfold\n  folds: 2\n  seed: 7',
    }),
  },
  ['data.csv:3:6: error: row 2 has an empty group cell in column "g"'],
);
check(
  t,
  'a grouped rule without a group column',
  { 'p.yaml': protocolText(csv, { split: 'split:\n  rule: grouped-kfold\n  folds: 2\n  seed: 7' }) },
  ['p.yaml:9:9: error: split rule grouped-kfold needs data.group to name the group column'],
);
const nfc = 'id,label,a\ncaf\u00e9,x,1\ncafe\u0301,y,2\nr3,x,3\nr4,y,4\n';
check(
  t,
  'ids that differ only by Unicode normalization (a warning)',
  { 'data.csv': nfc, 'p.yaml': protocolText(nfc) },
  [
    'data.csv:3:1: warning: ids "caf\u00e9" and "cafe\u0301" differ only by Unicode normalization; the split spec hashes bytes as ' +
      'given, so they are different ids',
  ],
  0,
);

t.test('an unreadable protocol path is exit 2', async (t) => {
  const r = await cli(['validate', 'missing.yaml'], tempDir());
  t.equal(r.code, 2);
  t.match(r.stderr, 'missing.yaml: error: file missing.yaml does not exist');
});

t.test('--format json prints the same findings as data', async (t) => {
  const dir = tempDir({ 'data.csv': csv, 'p.yaml': protocolText(csv, { extra: 'metrix: [accuracy]' }) });
  const r = await cli(['validate', 'p.yaml', '--format', 'json'], dir);
  t.equal(r.code, 1);
  t.same(JSON.parse(r.stdout), [
    {
      code: 'unknown-key',
      severity: 'error',
      message: 'unknown key "metrix" in the protocol',
      file: 'p.yaml',
      line: 13,
      col: 1,
      path: ['metrix'],
      hint: 'did you mean `metrics`?',
    },
  ]);
});
check(
  t,
  'select by variance after standardize (a warning)',
  { 'p.yaml': protocolText(csv, { extra: 'preprocess: [standardize, {select: {top: 2, by: variance}}]' }) },
  [
    'p.yaml:13:49: warning: select by variance comes after standardize, where every column has variance 1: which columns it keeps ' +
      'is decided by rounding',
    '  hint: select by variance before standardize, or by t-test or f-test',
  ],
  0,
);
