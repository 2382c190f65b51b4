import t from 'tap';
import { parseProtocol, PROTOCOL_SCHEMA } from '../../src/protocol/parse.js';
import { schemaValidator } from '../../src/io/schemas.js';

const validate = schemaValidator(PROTOCOL_SCHEMA);

const head = `foldseal: 1\nname: s\ndata: {file: d.csv, sha256: "${'0'.repeat(64)}", id: id, label: y}\nmodel: {kind: gaussian-nb}\n`;
const codes = (text: string) =>
  parseProtocol(head + text, 'p.yaml', validate).problems.map((p) => `${p.severity}:${p.code}:${p.position?.line}:${p.position?.col}`);

t.test('cross-field rules of the split and reconcile sections', async (t) => {
  t.same(codes('split: {folds: 3}\n'), ['error:missing-field:5:1']);
  t.same(codes('split: {rule: holdout, seed: 1}\n'), ['error:missing-field:5:1']);
  t.same(codes('split: {rule: holdout, seed: 1, test-fraction: 0.1234567}\n'), ['error:bad-format:5:48']);
  t.same(codes('split: {rule: holdout, seed: 1, test-fraction: 0.2, folds: 3}\n'), ['warning:unused-field:5:53']);
  t.same(codes('split: {rule: kfold, seed: 1, test-fraction: 0.2}\n'), ['error:unused-field:5:31']);
  t.same(codes('split: {rule: leave-one-out, repeats: 2, seed: 4, folds: 3, assign: stable}\n'), [
    'warning:unused-field:5:42',
    'warning:unused-field:5:51',
    'error:out-of-range:5:39',
    'warning:unused-field:5:61',
  ]);
  t.same(codes(`split: {pinned: {file: f.csv, sha256: "${'1'.repeat(64)}"}, seed: 3}\n`), ['error:pinned-with-rule:5:108']);
  t.same(codes('split: {rule: kfold, seed: 1}\nreconcile: {rule: refit, tie: abstain}\n'), ['warning:unused-field:6:26']);
});

t.test('shapes that are not a protocol', async (t) => {
  t.same(
    parseProtocol('- a\n- b\n', 'p.yaml', validate).problems.map((p) => p.code),
    ['not-a-protocol'],
  );
  t.same(
    parseProtocol('', 'p.yaml', validate).problems.map((p) => p.code),
    ['not-a-protocol'],
  );
  const wrong = parseProtocol(
    head.replace('foldseal: 1', 'foldseal: 2') +
      'split: {rule: kfold, seed: 1}\npreprocess: [{select: {top: 0, by: t-test}}, {impute: {}}, 5]\nmetrics: [accuracy, ' +
      'accuracy]\nverify: {tolerance: -1}\n',
    'p.yaml',
    validate,
  );
  t.same(
    wrong.problems.map((p) => p.message),
    [
      'foldseal must be 1, not 2',
      'preprocess[0].select.top must be ≥ 1, not 0',
      'preprocess[1].impute is missing the required field "by"',
      'preprocess[2] has the wrong form: see docs/protocol.md',
      'metrics lists the same item twice (items 1 and 2)',
      'verify.tolerance must be ≥ 0, not -1',
    ],
  );
  const opts = parseProtocol(
    head.replace('model: {kind: gaussian-nb}', 'model: {kind: knn, options: {k: 0, shrink: 1}}') + 'split: {rule: kfold, seed: 1}\n',
    'p.yaml',
    validate,
  );
  t.same(
    opts.problems.map((p) => p.message),
    ['unknown key "shrink" in model.options', 'model.options.k must be ≥ 1, not 0'],
  );
  t.same(
    parseProtocol(head.replace('name: s', 'name: Bad_Name') + 'split: {rule: kfold, seed: 1}\n', 'p.yaml', validate).problems.map(
      (p) => p.hint,
    ),
    ['use lower-case letters, digits and hyphens, starting with a letter or digit'],
  );
  t.same(
    parseProtocol(head + 'split: {rule: kfold, seed: 1}\ndescription: [1]\n', 'p.yaml', validate).problems.map((p) => p.message),
    ['description must be a string, not a list'],
  );
  t.same(
    parseProtocol(head.replace('data: {', 'data: {features: [], ') + 'split: {rule: kfold, seed: 1}\n', 'p.yaml', validate).problems.map(
      (p) => p.message,
    ),
    ['data.features must list at least 1 item'],
  );
  t.same(
    parseProtocol(head.replace('id: id', 'id: ""') + 'split: {rule: kfold, seed: 1}\n', 'p.yaml', validate).problems.map((p) => p.message),
    ['data.id must not be empty'],
  );
});
