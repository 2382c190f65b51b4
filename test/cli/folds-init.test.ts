import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { spawnSync } from 'node:child_process';
import { bin, cli, protocolText, sha256, smallCsv, tempDir } from '../helpers.js';

const csv = smallCsv();

t.test('folds writes the id,repeat,fold CSV sorted by repeat then id bytes, and a summary on stderr', async (t) => {
  const dir = tempDir({
    'data.csv': csv,
    'p.yaml': protocolText(csv, { split: 'split: {rule: stratified-kfold, folds: 4, repeats: 2, seed: 3}' }),
  });
  const r = await cli(['folds', 'p.yaml'], dir);
  t.equal(r.code, 0, r.stderr);
  const lines = r.stdout.trimEnd().split('\n');
  t.equal(lines[0], 'id,repeat,fold');
  t.equal(lines.length, 41);
  const ids = lines.slice(1, 21).map((l) => l.split(',')[0]);
  t.same(ids, [...ids].sort(), 'id byte order within a repeat');
  t.match(r.stderr, 'split-v1: 20 ids, 2 repeats, 4 folds');
  t.match(r.stderr, /repeat\s+fold\s+rows\s+n\[x\]\s+n\[y\]/);
  t.match(r.stderr, 'fold sizes: 5 to 5 rows');
  const out = await cli(['folds', 'p.yaml', '--out', 'f.csv'], dir);
  t.equal(out.code, 0);
  t.equal(readFileSync(join(dir, 'f.csv'), 'utf8'), r.stdout);
  t.match(out.stderr, 'wrote f.csv');
});

t.test('holdout folds are labelled test and train', async (t) => {
  const dir = tempDir({ 'data.csv': csv, 'p.yaml': protocolText(csv, { split: 'split: {rule: holdout, test-fraction: 0.25, seed: 3}' }) });
  const r = await cli(['folds', 'p.yaml'], dir);
  t.equal(r.code, 0, r.stderr);
  t.match(r.stderr, /1\s+test\s+6\s+3\s+3/);
  t.match(r.stderr, /1\s+train\s+14\s+7\s+7/);
});

function pinnedCase(name: string, pinned: string, expected: string[], hash?: string) {
  t.test(`pinned file: ${name}`, async (t) => {
    const dir = tempDir({
      'data.csv': csv,
      'f.csv': pinned,
      'p.yaml': protocolText(csv, { split: `split:\n  pinned: {file: f.csv, sha256: "${hash ?? sha256(pinned)}"}` }),
    });
    const r = await cli(['validate', 'p.yaml'], dir);
    t.equal(r.code, 1);
    for (const e of expected) t.ok(r.stderr.split('\n').includes(e), `${e}\n--- got:\n${r.stderr}`);
  });
}
const good = ['id,repeat,fold', ...Array.from({ length: 20 }, (_, i) => `r${i + 1},1,${(i % 2) + 1}`)];
pinnedCase(
  'wrong hash',
  good.join('\n') + '\n',
  [`p.yaml:9:33: error: the pinned file's SHA-256 is ${sha256(good.join('\n') + '\n')}, not the ${'a'.repeat(64)} this protocol records`],
  'a'.repeat(64),
);
pinnedCase('an id of the data missing', good.slice(0, 20).join('\n') + '\n', [
  'f.csv:1:1: error: 1 id of the data has no fold in repeat 1: "r20"',
]);
pinnedCase('an id the data lacks', [...good, 'r99,1,1'].join('\n') + '\n', ['f.csv:22:1: error: id "r99" is not in the data']);
pinnedCase('a fold out of range', [...good.slice(0, 20), 'r20,1,0'].join('\n') + '\n', [
  'f.csv:21:7: error: fold "0" is out of range (1 to 20)',
]);
pinnedCase('an id twice in one repeat', [...good, 'r3,1,2'].join('\n') + '\n', ['f.csv:22:1: error: id "r3" appears twice in repeat 1']);
pinnedCase('a wrong header', 'id,fold\nr1,1\n', ['f.csv:1:1: error: the pinned file\'s header is "id,fold", expected "id,repeat,fold"']);
pinnedCase('a bad repeat number', [...good.slice(0, 20), 'r20,x,1'].join('\n') + '\n', [
  'f.csv:21:5: error: repeat "x" is not a positive integer',
]);

t.test('a valid pinned file is used as the assignment', async (t) => {
  const pinned = good.join('\n') + '\n';
  const dir = tempDir({
    'data.csv': csv,
    'f.csv': pinned,
    'p.yaml': protocolText(csv, { split: `split:\n  pinned: {file: f.csv, sha256: "${sha256(pinned)}"}` }),
  });
  const r = await cli(['folds', 'p.yaml'], dir);
  t.equal(r.code, 0, r.stderr);
  t.equal(r.stdout.split('\n').filter((l) => l.endsWith(',1,1')).length, 10);
});

t.test('init writes a protocol that validates as is, and refuses to overwrite', async (t) => {
  const dir = tempDir({ 'data/trial.csv': csv });
  const missing = await cli(['init', 'data/trial.csv', '--label', 'label', '--id', 'id', '--out', 'protocols/trial.yaml'], dir);
  t.equal(missing.code, 2, "a missing parent folder is not created behind the user's back");
  t.equal(missing.stderr, 'protocols/trial.yaml: error: protocols/trial.yaml cannot be written: the folder protocols does not exist\n');
  mkdirSync(join(dir, 'protocols'));
  const r = await cli(['init', 'data/trial.csv', '--label', 'label', '--id', 'id', '--out', 'protocols/trial.yaml'], dir);
  t.equal(r.code, 0, r.stderr);
  t.match(readFileSync(join(dir, 'protocols', 'trial.yaml'), 'utf8'), 'file: "../data/trial.csv"');
  const ok = await cli(['init', 'data/trial.csv', '--label', 'label', '--id', 'id', '--group', 'g', '--out', 'trial.yaml'], dir);
  t.equal(ok.code, 0, ok.stderr);
  // Column a holds 1, 2, … 20: a row number, not a measurement, so it is left out with a note.
  t.match(ok.stderr, 'note: column "a" is not a feature: it looks like an id (consecutive whole numbers)');
  t.match(ok.stderr, 'wrote trial.yaml (20 rows, 2 classes, 2 features)');
  const text = readFileSync(join(dir, 'trial.yaml'), 'utf8');
  t.match(text, `sha256: "${sha256(csv)}"`);
  t.match(text, 'rule: grouped-kfold');
  t.match(text, /^# yaml-language-server: \$schema=.*schema\/protocol\.schema\.json$/m);
  t.equal((await cli(['validate', 'trial.yaml'], dir)).code, 0);
  const again = await cli(['init', 'data/trial.csv', '--label', 'label', '--out', 'trial.yaml'], dir);
  t.equal(again.code, 2);
  t.match(again.stderr, 'trial.yaml already exists');
  const plain = await cli(['init', 'data/trial.csv', '--label', 'label'], dir);
  t.equal(plain.code, 0, plain.stderr);
  t.match(readFileSync(join(dir, 'trial.protocol.yaml'), 'utf8'), 'rule: stratified-kfold');
  t.match(plain.stderr, 'warning: data.id is not set');
  const bad = await cli(['init', 'data/trial.csv', '--label', 'nope'], dir);
  t.equal(bad.code, 1);
  t.match(bad.stderr, 'column "nope" (data.label) is not in the data file\'s header');
  t.equal((await cli(['init', 'missing.csv', '--label', 'x'], dir)).code, 2);
});

t.test('help, version and usage errors', async (t) => {
  const help = await cli(['--help']);
  t.equal(help.code, 0);
  for (const c of ['validate', 'hash', 'init', 'folds', 'run']) t.match(help.stdout, c);
  t.match((await cli(['run', '--help'])).stdout, 'Example:');
  t.match((await cli(['--version'])).stdout, /^\d+\.\d+\.\d+/);
  t.equal((await cli(['valdate', 'x'])).code, 2);
  t.equal((await cli(['validate'])).code, 2);
});

t.test('a reader that stops early (| head) is not an error: no stack trace, the summary still written', async (t) => {
  const rows = smallCsv(3000);
  const dir = tempDir({
    'data.csv': rows,
    'p.yaml': protocolText(rows, { split: 'split: {rule: kfold, folds: 5, repeats: 20, seed: 3}' }),
  });
  const r = spawnSync('sh', ['-c', `"${process.execPath}" "${bin}" folds p.yaml | head -1`], {
    cwd: dir,
    encoding: 'utf8',
  });
  t.equal(r.stdout, 'id,repeat,fold\n');
  t.notMatch(r.stderr, /EPIPE|at .*\.js/);
  t.match(r.stderr, 'split-v1: 3000 ids, 20 repeats, 5 folds');
});
