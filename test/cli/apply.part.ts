import { copyFileSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { cli, root, tempDir } from '../helpers.js';

const demoNew = join(root, 'protocols', 'data', 'seedlings-new.csv');
const dir = tempDir();
const res = join(dir, 'res');
const run = await cli(['run', 'protocols/demo.yaml', '--out', res, '--refit'], root);

t.test('run on the demo writes models.json and applied.csv with held-out and folds rows', async (t) => {
  t.equal(run.code, 0, run.stderr);
  t.match(run.stdout, 'new rows (reconcile: mean-probability):');
  t.match(run.stdout, /\d+ of 20 rows have fold models that disagree/);
  const applied = readFileSync(join(res, 'applied.csv'), 'utf8').trimEnd().split('\n');
  t.equal(applied[0], 'id,source,predicted,agreement,p_no,p_yes');
  t.same(
    applied
      .slice(1)
      .map((l) => l.split(',')[1])
      .sort()
      .filter((s, i, a) => a.indexOf(s) === i),
    ['folds', 'held-out'],
  );
  const results = JSON.parse(readFileSync(join(res, 'results.json'), 'utf8'));
  t.ok(/^[0-9a-f]{64}$/.test(results.files['models.json']));
  t.ok(/^[0-9a-f]{64}$/.test(results.files['applied.csv']));
  const models = JSON.parse(readFileSync(join(res, 'models.json'), 'utf8'));
  t.equal(models['foldseal-models'], 2);
  t.equal(models.folds.length, 10);
  t.ok(models.refit, '--refit saves a model fitted on every labeled row');
});

t.test("apply reproduces run's applied.csv byte for byte from models.json", async (t) => {
  const r = await cli(['apply', res, demoNew, '--out', join(dir, 'again.csv')]);
  t.equal(r.code, 0, r.stderr);
  t.equal(readFileSync(join(dir, 'again.csv'), 'utf8'), readFileSync(join(res, 'applied.csv'), 'utf8'));
  t.notMatch(r.stderr, 'warning', 'columns the protocol knows about are not reported');
  const stdout = await cli(['apply', res, demoNew]);
  t.equal(stdout.stdout, readFileSync(join(res, 'applied.csv'), 'utf8'));
});

t.test('apply with another rule records it in a header comment and a sidecar', async (t) => {
  const out = join(dir, 'refit.csv');
  const r = await cli(['apply', res, demoNew, '--rule', 'refit', '--out', out]);
  t.equal(r.code, 0, r.stderr);
  const text = readFileSync(out, 'utf8');
  t.equal(text.split('\n')[0], '# foldseal apply: rule refit (the protocol declares mean-probability)');
  t.ok(text.includes(',refit,'), 'new rows come from the refit model');
  t.ok(text.includes(',held-out,'), 'known rows keep their held-out values');
  const sidecar = JSON.parse(readFileSync(`${out}.json`, 'utf8'));
  t.same([sidecar.rule, sidecar['protocol-rule']], ['refit', 'mean-probability']);
  const vote = await cli(['apply', res, demoNew, '--rule', 'majority-vote']);
  t.equal(vote.code, 2);
  t.match(vote.stderr, 'error: majority-vote over 10 fold models and 2 classes can tie');
  t.equal((await cli(['apply', res, demoNew, '--rule', 'majority-vote', '--tie', 'class-order'])).code, 0);
});

function broken(name: string, setup: (d: string) => string[], expected: string, code = 1) {
  t.test(`apply refuses: ${name}`, async (t) => {
    const d = tempDir();
    for (const f of ['results.json', 'models.json', 'predictions.csv']) copyFileSync(join(res, f), join(d, f));
    const r = await cli(['apply', d, ...setup(d)]);
    t.equal(r.code, code, r.stderr);
    t.match(r.stderr, expected);
  });
}
broken(
  'models.json edited by hand',
  (d) => {
    const p = join(d, 'models.json');
    writeFileSync(p, readFileSync(p, 'utf8').replace('"folds":[{"repeat":1', '"folds":[{"repeat":2'));
    return [demoNew];
  },
  'does not match the SHA-256 recorded in results.json (it was changed after the run)',
);
broken(
  'a results folder from another format version',
  (d) => {
    const p = join(d, 'results.json');
    writeFileSync(p, readFileSync(p, 'utf8').replace('"foldseal-results": 1', '"foldseal-results": 2'));
    return [demoNew];
  },
  'has results format 2; this foldseal reads format 1',
);
const header = readFileSync(demoNew, 'utf8').split('\n')[0];
const line = readFileSync(demoNew, 'utf8').split('\n')[1];
broken(
  'new rows with non-numeric cells',
  (d) => {
    writeFileSync(join(d, 'n.csv'), `${header}\n${line.replace(/,(\d+\.\d+),/, ',1;5,')}\n`);
    return [join(d, 'n.csv')];
  },
  'is not a number',
);
broken(
  'duplicate ids',
  (d) => {
    writeFileSync(join(d, 'n.csv'), `${header}\n${line}\n${line}\n`);
    return [join(d, 'n.csv')];
  },
  'error: id "CS-0121" appears again (first on line 2)',
);
broken(
  'an id column missing',
  (d) => {
    writeFileSync(join(d, 'n.csv'), header.replace('seedling_id', 'plant') + `\n${line}\n`);
    return [join(d, 'n.csv')];
  },
  'error: the id column "seedling_id" is not in the new-rows file\'s header',
);
broken(
  'a feature column missing',
  (d) => {
    writeFileSync(join(d, 'n.csv'), header.replace('phenol_index', 'phenols') + `\n${line}\n`);
    return [join(d, 'n.csv')];
  },
  'error: feature "phenol_index" is not in the new-rows file\'s header',
);
broken('a missing results folder', () => ['x.csv'], 'does not exist', 2);

t.test('run with reconcile rule refit writes refit rows; majority-vote without a tie rule does not validate', async (t) => {
  const d = tempDir();
  const demo = readFileSync(join(root, 'protocols', 'demo.yaml'), 'utf8').replaceAll(
    'file: data/',
    `file: ${join(root, 'protocols', 'data')}/`,
  );
  writeFileSync(join(d, 'refit.yaml'), demo.replace('rule: mean-probability', 'rule: refit'));
  const r = await cli(['run', 'refit.yaml', '--out', 'res', '--allow-outside'], d);
  t.equal(r.code, 0, r.stderr);
  const sources = readFileSync(join(d, 'res', 'applied.csv'), 'utf8')
    .trimEnd()
    .split('\n')
    .slice(1)
    .map((l) => l.split(',')[1]);
  t.same([...new Set(sources)].sort(), ['held-out', 'refit']);
  t.ok(JSON.parse(readFileSync(join(d, 'res', 'models.json'), 'utf8')).refit, 'the refit model is saved');
  writeFileSync(join(d, 'vote.yaml'), demo.replace('rule: mean-probability', 'rule: majority-vote'));
  const v = await cli(['validate', 'vote.yaml', '--allow-outside'], d);
  t.equal(v.code, 1);
  t.match(v.stderr, /vote\.yaml:\d+:9: error: majority-vote over 10 fold models and 2 classes can tie, and reconcile\.tie is not set/);
  t.match(v.stderr, 'hint: add `tie: mean-probability`, `tie: abstain` or `tie: class-order`');
});
