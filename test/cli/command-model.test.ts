/**
 * Command models (docs/command-models.md): consent, the contract, saved model folders, verify
 * and apply, and every bad program. The mechanics run with a small JavaScript model; the
 * tested Python example (examples/models/forest.py, Debian's python3-sklearn) is checked against
 * a by-hand run written from the document (test/reference/command_by_hand.py).
 */
import { mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { cli, referenceTable, sha256, tempDir } from '../helpers.js';
import { CENTROID_MODEL } from './command-model.fixture.js';

const iris = referenceTable('iris.csv');
const data = iris.csv;
// Five invented new rows: iris measurements shifted a little, under new ids.
const newRows =
  [
    iris.header.join(','),
    ...iris.body
      .slice(0, 150)
      .filter((_, i) => i % 30 === 7)
      .map((r, i) => [`new-${i}`, ...r.slice(1, 5).map((v) => String(Number(v) + 0.05)), r[5]].join(',')),
  ].join('\n') + '\n';

function project(options = '{}', extra: Record<string, string> = {}, timeLimit = 60, withNewRows = true, folds = 3) {
  const files = { 'data.csv': data, 'new.csv': newRows, 'model.js': CENTROID_MODEL, ...extra };
  const protocol = [
    'foldseal: 1',
    'name: centroids',
    `data: {file: data.csv, sha256: "${sha256(data)}", id: id, label: species}`,
    `split: {rule: stratified-kfold, folds: ${folds}, seed: 5}`,
    'preprocess: [standardize]',
    'model:',
    '  kind: command',
    '  command:',
    `    run: ["${process.execPath}", model.js]`,
    `    files: [{file: model.js, sha256: "${sha256(files['model.js'])}"}]`,
    `    time-limit: ${timeLimit}`,
    `  options: ${options}`,
    withNewRows ? `reconcile: {rule: mean-probability, new-rows: {file: new.csv, sha256: "${sha256(newRows)}"}}` : '',
    'metrics: [accuracy, log-loss]',
  ].join('\n');
  const dir = tempDir({ ...files, 'p.yaml': protocol + '\n' });
  mkdirSync(join(dir, 'tmp'));
  return dir;
}
/**
 * Each run's temporary fold folders go under the project's tmp/, which must be empty afterwards.
 * The model's node processes are not measured for coverage (it would only slow them down).
 */
const env = (dir: string) => ({ TMPDIR: join(dir, 'tmp'), NODE_V8_COVERAGE: undefined });

t.test('nothing runs without --allow-commands; the refusal names the exact command', async (t) => {
  const dir = project();
  const r = await cli(['run', 'p.yaml', '--out', 'res'], dir, env(dir));
  t.equal(r.code, 2, r.stderr);
  t.match(r.stderr, `p.yaml:9:10: error: this protocol runs a program of its own: \`${process.execPath} model.js fit FOLDER\``);
  t.match(r.stderr, 'hint: read the program, then pass --allow-commands to run it');
  t.notOk(readdirSync(dir).includes('res'));
  t.same(readdirSync(join(dir, 'tmp')), []);
});

t.test('with consent: every fold fitted by the program, its folders saved, verify and apply agree', async (t) => {
  const dir = project('{shrink: 0}', {}, 60, true, 2);
  const r = await cli(['run', 'p.yaml', '--out', 'res', '--allow-commands', '--jobs', '2', '--refit'], dir, env(dir));
  t.equal(r.code, 0, r.stderr);
  t.same(readdirSync(join(dir, 'tmp')), [], 'every temporary fold folder removed');
  const models = JSON.parse(readFileSync(join(dir, 'res', 'models.json'), 'utf8'));
  t.equal(models.kind, 'command');
  t.same(models.command.options, { shrink: 0 });
  t.equal(models.folds.length, 2);
  for (const f of models.folds) {
    t.same(Object.keys(f.model.folder), ['means.json', 'versions.json']);
    const bytes = Buffer.from(f.model.folder['means.json'].base64, 'base64');
    t.equal(sha256(bytes), f.model.folder['means.json'].sha256);
    // The seed the program was given is the spec'd per-fold seed (docs/command-models.md).
    const seed = Number.parseInt(sha256(`foldseal/model-seed-v1\u00005\u0000${f.repeat}\u0000${f.fold}`).slice(0, 8), 16) >>> 1;
    t.equal(JSON.parse(bytes.toString('utf8')).seed, seed);
    t.same(f.model.versions, { node: process.version });
  }
  t.equal(models.refit.fold, 0);
  const predictions = readFileSync(join(dir, 'res', 'predictions.csv'), 'utf8');
  t.equal(predictions.trimEnd().split('\n').length, 151);
  t.match(r.stdout, /accuracy\s+0\.\d+/);

  const refused = await cli(['verify', 'res/manifest.json', '--rerun', '--allow-unsigned'], dir, env(dir));
  t.equal(refused.code, 2);
  t.match(
    refused.stderr,
    /^res\/manifest\.json: error: this protocol runs a program of its own/m,
    'named at the manifest, not a temporary copy',
  );
  t.match(refused.stderr, 'pass --allow-commands');
  const v = await cli(['verify', 'res/manifest.json', '--rerun', '--allow-unsigned', '--allow-commands'], dir, env(dir));
  t.match(v.stdout, 'the re-run itself was identical', v.stdout + v.stderr);

  const comparedUnasked = await cli(['compare', 'p.yaml', 'res'], dir, env(dir));
  t.equal(comparedUnasked.code, 2, 'compare runs a protocol side only with consent');
  t.match(comparedUnasked.stderr, 'pass --allow-commands');
  const noConsent = await cli(['apply', 'res', 'new.csv'], dir, env(dir));
  t.equal(noConsent.code, 2);
  t.match(noConsent.stderr, `these fold models answer through a program: \`${process.execPath} model.js predict FOLDER\``);
  const applied = await cli(['apply', 'res', 'new.csv', '--allow-commands', '--out', 'applied.csv'], dir, env(dir));
  t.equal(applied.code, 0, applied.stderr);
  t.equal(
    readFileSync(join(dir, 'applied.csv'), 'utf8'),
    readFileSync(join(dir, 'res', 'applied.csv'), 'utf8'),
    'apply reproduces the run',
  );
  t.same(readdirSync(join(dir, 'tmp')), []);
});

const bad: [string, string, RegExp, number?][] = [
  [
    'a program that exits non-zero',
    '{behave: exit-3}',
    /repeat 1, fold \d: `.* model\.js fit FOLDER` exited with code 3; the last lines of its stderr:\n {4}loading…\n {4}no convergence in fold \d/,
  ],
  ['a model folder left empty', '{behave: empty-model}', /exited 0 but left FOLDER\/model empty/],
  ['no proba.csv', '{behave: no-output}', /exited 0 but wrote no proba\.csv/],
  ['a malformed proba.csv', '{behave: malformed}', /proba\.csv is not a valid table: row has 3 cells but the header has 4 \(line 2\)/],
  ['a missing row', '{behave: partial}', /proba\.csv has no row for 1 of the 75 ids asked for/],
  ['probabilities that do not sum to 1', '{behave: bad-sum}', /the probabilities of "iris-\d+" sum to 0\.9[89]\d*, not 1 \(within 1e-9\)/],
  ['a program past its time limit', '{behave: sleep}', /ran longer than the time limit of 0\.5 s and was stopped/],
  [
    'a program that changes its own file',
    '{behave: touch-file}',
    /the model's file model\.js changed during the run \(SHA-256 now [0-9a-f]{64}\); nothing was written/,
  ],
];
for (const [name, options, message] of bad) {
  t.test(`${name}: a located error, nothing written, no temporary folder left`, async (t) => {
    const dir = project(options, {}, options.includes('sleep') ? 0.5 : 60, false, 2);
    const r = await cli(['run', 'p.yaml', '--out', 'res', '--allow-commands', '--jobs', '1'], dir, env(dir));
    t.equal(r.code, 1, r.stderr);
    // Located at the command, or for a changed file at its recorded hash.
    t.match(r.stderr, options.includes('touch') ? /^p\.yaml:10:38: error: / : /^p\.yaml:9:10: error: /m);
    t.match(r.stderr, message);
    t.notOk(readdirSync(dir).includes('res'), 'no results folder');
    t.same(readdirSync(join(dir, 'tmp')), [], 'no temporary folder left');
  });
}

t.test('a dependency file that changed before the run is refused before anything runs', async (t) => {
  const dir = project();
  writeFileSync(join(dir, 'model.js'), CENTROID_MODEL + '\n// edited\n');
  const r = await cli(['validate', 'p.yaml'], dir);
  t.equal(r.code, 1);
  t.match(
    r.stderr,
    /p\.yaml:10:\d+: error: the model's file model\.js has SHA-256 [0-9a-f]{64}, not the [0-9a-f]{64} this protocol records/,
  );
});

t.test('what a command model cannot be combined with yet is refused at validation', async (t) => {
  const dir = project();
  const text = readFileSync(join(dir, 'p.yaml'), 'utf8');
  writeFileSync(join(dir, 'q.yaml'), text + 'statistics: {permutation: {count: 9, seed: 1, metric: accuracy}}\n');
  const q = await cli(['validate', 'q.yaml'], dir);
  t.match(q.stderr, 'error: a permutation test with a command model is not supported yet');
  writeFileSync(join(dir, 's.yaml'), text.replace('kind: command', 'kind: knn'));
  const s = await cli(['validate', 's.yaml'], dir);
  t.match(s.stderr, 'error: model.command is set but model.kind is knn');
  const shard = await cli(['run', 'p.yaml', '--shard', '1/2', '--out', 'part.json', '--allow-commands'], dir);
  t.equal(shard.code, 2);
  t.match(shard.stderr, 'run --shard does not run command models yet');
});
