/**
 * k-nearest-neighbour fold models reference their training rows in models.json instead of
 * copying them (src/reconcile/training-rows.ts); `apply` reads the run's data again and puts
 * them back. On scikit-learn's bundled breast-cancer table (569 × 30; its knn probabilities are
 * checked against scikit-learn in test/reference). The oracle here is the run itself: the
 * applied.csv a run writes from the fold models still in memory, which apply must reproduce
 * byte for byte from models.json and the data.
 */
import { copyFileSync, mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { restored, referenced } from '../../src/reconcile/training-rows.js';
import { models } from '../../src/model/registry.js';
import { matrix } from '../../src/table/matrix.js';
import { cli, referenceTable, sha256, tempDir } from '../helpers.js';

const { csv, header, body } = referenceTable('breast-cancer.csv');
// Thirty rows under new ids: the fold models predict them (no held-out value).
const fresh = `${header.join(',')}\n${body
  .slice(0, 30)
  .map((r) => [`new-${r[0]}`, ...r.slice(1)].join(','))
  .join('\n')}\n`;

function protocol(rule: string): string {
  return (
    `foldseal: 1\nname: knn-apply\ndata: {file: data/bc.csv, sha256: "${sha256(csv)}", id: id, label: diagnosis}\n` +
    'split: {rule: stratified-kfold, folds: 5, repeats: 2, seed: 11}\n' +
    'preprocess: [standardize, {select: {top: 12, by: t-test}}]\nmodel: {kind: knn, options: {k: 7}}\n' +
    `reconcile: {rule: ${rule}, new-rows: {file: data/new.csv, sha256: "${sha256(fresh)}"}}\nmetrics: [accuracy]\n`
  );
}

const dir = tempDir({
  'data/bc.csv': csv,
  'data/new.csv': fresh,
  'mean.yaml': protocol('mean-probability'),
  'refit.yaml': protocol('refit'),
});
const mean = await cli(['run', 'mean.yaml', '--out', 'mean'], dir);
const refit = await cli(['run', 'refit.yaml', '--out', 'refit'], dir);

t.test('models.json references the training rows instead of copying them', async (t) => {
  t.equal(mean.code, 0, mean.stderr);
  const saved = JSON.parse(readFileSync(join(dir, 'mean', 'models.json'), 'utf8'));
  t.equal(saved['foldseal-models'], 2);
  t.equal(saved.folds.length, 10);
  for (const f of saved.folds) {
    t.same(f.model, { k: 7, classCount: 2 }, 'the model keeps only its settings');
    t.equal(f['training-rows']['table-rows'], 569);
    t.ok(f['training-rows'].rows >= 454 && f['training-rows'].rows <= 456, 'four fifths of the rows trained each fold');
    t.match(f['training-rows'].sha256, /^[0-9a-f]{64}$/);
  }
  // 10 folds × ~455 rows × 12 features as JSON numbers would be about a megabyte.
  t.ok(statSync(join(dir, 'mean', 'models.json')).size < 200_000, 'models.json stays small');
});

t.test('apply rebuilds the rows and reproduces the run, fold models and refit model', async (t) => {
  for (const [name, run] of [
    ['mean', mean],
    ['refit', refit],
  ] as const) {
    t.equal(run.code, 0, run.stderr);
    const r = await cli(['apply', name, 'data/new.csv'], dir);
    t.equal(r.code, 0, r.stderr);
    t.equal(r.stdout, readFileSync(join(dir, name, 'applied.csv'), 'utf8'), `${name}: applied.csv byte for byte`);
  }
  t.ok(JSON.parse(readFileSync(join(dir, 'refit', 'models.json'), 'utf8')).refit['training-rows'], 'the refit model references its rows');
});

t.test('the data moved: apply says so, and a copy given with --data is checked and used', async (t) => {
  const d = tempDir();
  mkdirSync(join(d, 'data'));
  for (const f of ['mean.yaml']) copyFileSync(join(dir, f), join(d, f));
  copyFileSync(join(dir, 'data', 'new.csv'), join(d, 'data', 'new.csv'));
  const run = await cli(['run', 'mean.yaml', '--out', 'res'], d, {});
  t.equal(run.code, 1, 'no data yet: the run fails');
  copyFileSync(join(dir, 'data', 'bc.csv'), join(d, 'data', 'bc.csv'));
  t.equal((await cli(['run', 'mean.yaml', '--out', 'res'], d)).code, 0);
  renameSync(join(d, 'data', 'bc.csv'), join(d, 'bc-copy.csv'));
  const missing = await cli(['apply', 'res', 'data/new.csv'], d);
  t.equal(missing.code, 1);
  t.match(missing.stderr, 'error: file data/bc.csv does not exist');
  t.match(missing.stderr, "error: the knn fold models reference their training rows, and the run's table cannot be read again");
  t.match(missing.stderr, 'hint: pass --data FILE with a copy of the data the run read');
  const given = await cli(['apply', 'res', 'data/new.csv', '--data', 'bc-copy.csv'], d);
  t.equal(given.code, 0, given.stderr);
  t.equal(given.stdout, readFileSync(join(d, 'res', 'applied.csv'), 'utf8'));
  // One more row at the end: another file, another hash.
  writeFileSync(join(d, 'changed.csv'), `${csv}${body[0].map((v, i) => (i === 0 ? 'extra' : v)).join(',')}\n`);
  const changed = await cli(['apply', 'res', 'data/new.csv', '--data', 'changed.csv'], d);
  t.equal(changed.code, 1);
  t.match(changed.stderr, /error: the data file's SHA-256 is [0-9a-f]{64}, not the/);
  t.match(changed.stderr, 'hint: this is not the data the run read');
});

t.test('rows that no longer hash as recorded are refused', async (t) => {
  const d = tempDir();
  for (const f of ['mean.yaml', 'data/bc.csv', 'data/new.csv']) {
    mkdirSync(join(d, 'data'), { recursive: true });
    copyFileSync(join(dir, f), join(d, f));
  }
  t.equal((await cli(['run', 'mean.yaml', '--out', 'res'], d)).code, 0);
  const path = join(d, 'res', 'models.json');
  const saved = JSON.parse(readFileSync(path, 'utf8'));
  saved.folds[3]['training-rows'].sha256 = '0'.repeat(64);
  const text = `${JSON.stringify(saved)}\n`;
  writeFileSync(path, text);
  // results.json records models.json's hash: a deliberate edit of both, as a foldseal that rebuilt rows differently would meet.
  const resultsPath = join(d, 'res', 'results.json');
  writeFileSync(
    resultsPath,
    readFileSync(resultsPath, 'utf8').replace(/"models.json": "[0-9a-f]{64}"/, `"models.json": "${sha256(text)}"`),
  );
  const r = await cli(['apply', 'res', 'data/new.csv'], d);
  t.equal(r.code, 1);
  t.match(
    r.stderr,
    /error: the knn model of repeat 1, fold 4 cannot be rebuilt from the run's table: the rebuilt training rows have SHA-256 [0-9a-f]{64}, not the 0{64} recorded/,
  );
});

t.test('a reference is followed only onto a table of its size and its row list', async (t) => {
  const X = matrix(5, 2, Float64Array.from([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]));
  const y = Int32Array.from([0, 1, 0, 1, 0]);
  const ids = ['e', 'a', 'd', 'b', 'c'];
  // Rows 1, 3, 4 in id order: a, b, c.
  const train = Int32Array.from([1, 3, 4]);
  const fitted = models.knn.fit(
    matrix(3, 2, Float64Array.from([3, 4, 7, 8, 9, 10])),
    Int32Array.from([1, 1, 0]),
    { k: 1 },
    { classCount: 2 },
  );
  const saved = referenced('knn', fitted, train, 5);
  t.equal(saved['training-rows'].bits, Buffer.from([0b11010]).toString('base64'));
  const pipeline = { steps: [], columns: ['u', 'v'] };
  const back = restored('knn', { ...saved, pipeline }, { X, y, ids });
  t.same(back.problem === undefined && back.model, fitted, 'rows a, b, c put back in id order');
  t.equal(restored('knn', { ...saved, pipeline }, { X: matrix(4, 2), y: y.subarray(0, 4), ids: ids.slice(0, 4) }).problem, 'table-rows');
  const wide = { ...saved, 'training-rows': { ...saved['training-rows'], bits: Buffer.from([0b11010, 0]).toString('base64') } };
  t.equal(restored('knn', { ...wide, pipeline }, { X, y, ids }).problem, 'bits', 'a row list of the wrong length');
  const past = { ...saved, 'training-rows': { ...saved['training-rows'], bits: Buffer.from([0b111010]).toString('base64') } };
  t.equal(restored('knn', { ...past, pipeline }, { X, y, ids }).problem, 'bits', 'a row past the table');
  const more = { ...saved, 'training-rows': { ...saved['training-rows'], bits: Buffer.from([0b11011]).toString('base64') } };
  t.equal(restored('knn', { ...more, pipeline }, { X, y, ids }).problem, 'bits', 'a row list naming more rows than recorded');
  const other = restored('knn', { ...saved, pipeline }, { X, y: Int32Array.from([0, 0, 0, 1, 0]), ids });
  t.equal(other.problem, 'changed', 'another class for a row');
});

t.test('the run is read again only from the protocol it recorded, inside the review folders', async (t) => {
  const d = tempDir();
  mkdirSync(join(d, 'work', 'data'), { recursive: true });
  for (const f of ['mean.yaml', 'data/bc.csv', 'data/new.csv']) copyFileSync(join(dir, f), join(d, 'work', f));
  t.equal((await cli(['run', 'mean.yaml', '--out', 'res'], join(d, 'work'))).code, 0);
  // Run from inside the results folder: the review folder is that folder, and the data lies above it.
  const outside = await cli(['apply', '.', '../data/new.csv'], join(d, 'work', 'res'));
  t.equal(outside.code, 1);
  t.match(outside.stderr, "error: the knn fold models reference their training rows, and the run's files lie outside the review folders");
  t.match(outside.stderr, 'or --allow-outside if you trust this results folder');
  const allowed = await cli(['apply', '.', '../data/new.csv', '--allow-outside'], join(d, 'work', 'res'));
  t.equal(allowed.code, 0, allowed.stderr);
  t.equal(allowed.stdout, readFileSync(join(d, 'work', 'res', 'applied.csv'), 'utf8'));
  // A manifest whose protocol is not the one models.json was made by (the manifest is signed, not hash-listed).
  const manifestPath = join(d, 'work', 'res', 'manifest.json');
  writeFileSync(manifestPath, readFileSync(manifestPath, 'utf8').replace('"k":7', '"k":9'));
  const other = await cli(['apply', 'res', 'data/new.csv'], join(d, 'work'));
  t.equal(other.code, 1);
  t.match(other.stderr, 'does not record the protocol models.json was made by');
});
