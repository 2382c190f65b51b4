/**
 * Command models (docs/command-models.md): consent, the contract, saved model folders, verify
 * and apply, and every bad program. The mechanics run with a small JavaScript model; the
 * tested Python example (examples/models/forest.py, Debian's python3-sklearn) is checked against
 * a by-hand run written from the document (test/reference/command_by_hand.py).
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { cli, debianPython, debianR, referenceTable, root, sha256, tempDir } from '../helpers.js';
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
  t.match(refused.stderr, 'pass --allow-commands');
  const v = await cli(['verify', 'res/manifest.json', '--rerun', '--allow-unsigned', '--allow-commands'], dir, env(dir));
  t.match(v.stdout, 'the re-run itself was identical', v.stdout + v.stderr);

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
  ['a malformed proba.csv', '{behave: malformed}', /proba\.csv line 2 has 3 cells, not 4/],
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

// The tested examples, each against a by-hand run of the same script on the exported folds.
const python = debianPython('sklearn');
const rGlmnet = debianR('glmnet');
const examples = [
  {
    name: 'the Python example (scikit-learn random forest)',
    script: 'forest.py',
    run: ['/usr/bin/python3', 'forest.py'],
    options: { trees: 25 },
    reported: 'scikit-learn',
    skip: python ? false : "Debian's python3-sklearn is not installed",
  },
  {
    name: 'the R example (glmnet elastic net)',
    script: 'glmnet.R',
    run: ['Rscript', 'glmnet.R'],
    options: { alpha: 0.5, lambda: 0.01 },
    reported: 'glmnet',
    skip: rGlmnet ? false : "R's glmnet is not installed (Debian r-cran-glmnet); .ci/run installs it",
  },
];
for (const ex of examples) {
  t.test(`${ex.name} equals its by-hand run on the exported folds`, { skip: ex.skip }, async (t) => {
    const script = readFileSync(join(root, 'examples', 'models', ex.script), 'utf8');
    const dir = tempDir({
      'iris.csv': data,
      [ex.script]: script,
      'p.yaml': [
        'foldseal: 1',
        'name: example',
        `data: {file: iris.csv, sha256: "${sha256(data)}", id: id, label: species}`,
        // A holdout half: one fit and one prediction per side keeps the suite quick.
        'split: {rule: holdout, test-fraction: 0.5, seed: 11}',
        'model:',
        '  kind: command',
        `  command: {run: ${JSON.stringify(ex.run)}, files: [{file: ${ex.script}, sha256: "${sha256(script)}"}]}`,
        `  options: ${JSON.stringify(ex.options)}`,
        'metrics: [accuracy, log-loss]',
      ].join('\n'),
    });
    // (verify and apply run the program through the same code as the JavaScript model above.)
    const r = await cli(['run', 'p.yaml', '--out', 'res', '--allow-commands'], dir);
    t.equal(r.code, 0, r.stderr);
    t.equal((await cli(['folds', 'p.yaml', '--out', 'folds.csv'], dir)).code, 0);
    const hand = spawnSync(
      '/usr/bin/python3',
      [
        join(root, 'test', 'reference', 'command_by_hand.py'),
        'iris.csv',
        'folds.csv',
        'species',
        '11',
        JSON.stringify(ex.options),
        '1',
        ...ex.run,
      ],
      { cwd: dir, encoding: 'utf8' },
    );
    t.equal(hand.status, 0, hand.stderr);
    const byHand = JSON.parse(hand.stdout) as Record<string, number[]>;
    const lines = readFileSync(join(dir, 'res', 'predictions.csv'), 'utf8')
      .trimEnd()
      .split('\n')
      .slice(1);
    t.equal(lines.length, 75, 'the holdout half');
    t.equal(Object.keys(byHand).length, 75);
    let worst = 0;
    for (const l of lines) {
      const c = l.split(',');
      const ref = byHand[`${c[1]}/${c[0]}`];
      for (let j = 0; j < 3; j++) worst = Math.max(worst, Math.abs(Number(c[5 + j]) - ref[j]));
    }
    t.equal(worst, 0, 'the same probabilities, bit for bit');
    const results = JSON.parse(readFileSync(join(dir, 'res', 'results.json'), 'utf8'));
    t.ok(results.model.command.versions[0][ex.reported], 'the program reported its runtime versions');
    t.ok(results.summary.accuracy.mean > 0.85, `accuracy ${results.summary.accuracy.mean}`);
  });
}
