/** Work on other threads (fold fits, parsing half of a large table) gives byte-identical results to one thread. */
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import t from 'tap';
import { bin, cli, root, sha256, tempDir } from '../helpers.js';

const threadEnv = (threads: string) => ({ FOLDSEAL_THREADS: threads, FOLDSEAL_TRUSTED: join(root, 'protocols', 'data') });
/** The built binary in a child process: the first test runs the whole thing as a user would. */
const spawned = (threads: string, args: string[], cwd: string) =>
  spawnSync(process.execPath, [bin, ...args], { cwd, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1', ...threadEnv(threads) } });
/** In this process (the worker threads are real: the tests run compiled JavaScript), which is much quicker under tap. */
const run = async (threads: string, args: string[], cwd: string) => {
  const r = await cli(args, cwd, threadEnv(threads));
  return { status: r.code, stdout: r.stdout, stderr: r.stderr };
};
const demoData = join(root, 'protocols', 'data');
const demo = readFileSync(join(root, 'protocols', 'demo.yaml'), 'utf8').replaceAll('file: data/', `file: ${demoData}/`);
// An impute step has no class-moment form, so these folds are fitted row by row, on the workers.
const onWorkers = demo.replace('preprocess: [standardize,', 'preprocess: [{impute: {by: median}}, standardize,');

t.test('FOLDSEAL_THREADS=3 and =1 write identical files, the folds and a permutation test on worker threads', async (t) => {
  // The impute step keeps these folds off the class-moment path, so the workers refit the pipeline row by row.
  const withTest = onWorkers.replace('verify:', 'statistics: {permutation: {count: 6, seed: 9, metric: roc-auc}}\nverify:');
  const dir = tempDir({ 'p.yaml': withTest });
  // The binary on three threads as a user runs it; one thread in this process.
  const three = spawned('3', ['run', 'p.yaml', '--out', 'res-3'], dir);
  t.equal(three.status, 0, three.stderr);
  const one = await run('1', ['run', 'p.yaml', '--out', 'res-1'], dir);
  t.equal(one.status, 0, one.stderr);
  t.match(three.stdout, /permutation test \(roc-auc/);
  for (const f of ['predictions.csv', 'results.json', 'models.json', 'applied.csv']) {
    t.equal(readFileSync(join(dir, 'res-3', f), 'utf8'), readFileSync(join(dir, 'res-1', f), 'utf8'), f);
  }
  t.equal(JSON.parse(readFileSync(join(dir, 'res-1', 'results.json'), 'utf8')).statistics.permutation.count, 6);
});

t.test('knn on two threads: five folds split into parts of their test rows, the same files as one thread', async (t) => {
  // knn fits cheaply (it keeps its rows), so five folds on two threads become ten half-folds (run/executor.ts partsFor).
  const knn = onWorkers
    .replace('model: {kind: gaussian-nb}', 'model: {kind: knn, options: {k: 7}}')
    .replace(/folds: \d+/, 'folds: 5')
    .replace(/repeats: \d+/, 'repeats: 1');
  const dir = tempDir({ 'p.yaml': knn });
  const two = await run('2', ['run', 'p.yaml', '--out', 'res-2'], dir);
  t.equal(two.status, 0, two.stderr);
  const one = await run('1', ['run', 'p.yaml', '--out', 'res-1'], dir);
  t.equal(one.status, 0, one.stderr);
  t.match(readFileSync(join(dir, 'res-1', 'results.json'), 'utf8'), '"fold": 5');
  for (const f of ['predictions.csv', 'results.json', 'models.json', 'applied.csv'])
    t.equal(readFileSync(join(dir, 'res-2', f), 'utf8'), readFileSync(join(dir, 'res-1', f), 'utf8'), f);
});

t.test('a fit error on the fold threads is the same user error', async (t) => {
  const dir = tempDir({ 'p.yaml': onWorkers.replace('model: {kind: gaussian-nb}', 'model: {kind: multinomial-nb}') });
  const r = await run('2', ['run', 'p.yaml', '--out', 'res'], dir);
  t.equal(r.status, 1, r.stderr);
  t.match(r.stderr, 'error: multinomial-nb needs non-negative counts');
});

t.test('a table parsed on two threads reads the same as on one', async (t) => {
  const dir = tempDir({ 'p.yaml': demo });
  for (const threads of ['1', '2']) t.equal((await run(threads, ['run', 'p.yaml', '--out', `res-${threads}`], dir)).status, 0);
  for (const f of ['predictions.csv', 'results.json', 'models.json'])
    t.equal(readFileSync(join(dir, 'res-2', f), 'utf8'), readFileSync(join(dir, 'res-1', f), 'utf8'), f);
  // Problems found in the half the second thread reads are reported exactly as on one thread.
  const lines = readFileSync(join(demoData, 'seedlings.csv'), 'utf8').trimEnd().split('\n');
  for (const [what, edit] of [
    ['a ragged row', (l: string) => l + ',extra'],
    ['a bad number', (l: string) => l.replace(/,([0-9.]+),/, ',12abc,')],
  ] as const) {
    const broken = [...lines.slice(0, -3), edit(lines[lines.length - 3]), ...lines.slice(-2)].join('\n') + '\n';
    const d = tempDir({
      'd.csv': broken,
      'p.yaml': demo.replace(`${demoData}/seedlings.csv`, 'd.csv').replace(/sha256: "914f[0-9a-f]+"/, `sha256: "${sha256(broken)}"`),
    });
    const one = await run('1', ['validate', 'p.yaml'], d);
    const two = await run('2', ['validate', 'p.yaml'], d);
    t.equal(one.status, 1, `${what}: invalid`);
    t.equal(two.stderr + two.stdout, one.stderr + one.stdout, `${what}: same report`);
  }
});

t.test('split keys of many ids derived on two threads equal those from one', async (t) => {
  // 12,000 invented rows (more than the 10,000 ids at which keys are split between threads).
  const lines = ['id,label,a,b'];
  for (let i = 1; i <= 12000; i++) lines.push(`r${i},${i % 3 ? 'x' : 'y'},${(i * 7) % 13},${(i * 11) % 17}.5`);
  const csv = lines.join('\n') + '\n';
  const dir = tempDir({
    'd.csv': csv,
    'p.yaml':
      `foldseal: 1\nname: many\ndata: {file: d.csv, sha256: "${sha256(csv)}", id: id, label: label}\nsplit: {rule: ` +
      `stratified-kfold, folds: 4, repeats: 2, seed: 5}\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy]\n`,
  });
  // Without an id column the ids are row numbers, and the keys are split between threads afterwards.
  writeFileSync(join(dir, 'q.yaml'), readFileSync(join(dir, 'p.yaml'), 'utf8').replace(', id: id', ''));
  for (const protocol of ['p', 'q']) {
    for (const threads of ['1', '2'])
      t.equal((await run(threads, ['folds', `${protocol}.yaml`, '--out', `${protocol}-${threads}.csv`], dir)).status, 0);
    t.equal(
      readFileSync(join(dir, `${protocol}-2.csv`), 'utf8'),
      readFileSync(join(dir, `${protocol}-1.csv`), 'utf8'),
      `${protocol}: assignment CSV identical`,
    );
  }
});

t.test(
  'split keys of the ids of a Parquet table, half derived on the other thread while the table is built, equal those from one',
  async (t) => {
    // 12,000 invented rows in a Parquet file (its ids are known before the table is built: the
    // other thread derives half their keys meanwhile, for every repeat), written by parquet-wasm.
    const require = createRequire(import.meta.url);
    const pq = require('parquet-wasm/node');
    const arrow = require('apache-arrow');
    const n = 12000;
    const table = arrow.tableFromArrays({
      id: Array.from({ length: n }, (_, i) => `r${i + 1}`),
      label: Array.from({ length: n }, (_, i) => (i % 3 ? 'x' : 'y')),
      a: Float64Array.from({ length: n }, (_, i) => (i * 7) % 13),
    });
    const bytes: Uint8Array = pq.writeParquet(pq.Table.fromIPCStream(arrow.tableToIPC(table, 'stream')));
    const dir = tempDir({
      'd.parquet': bytes,
      'p.yaml':
        `foldseal: 1\nname: many\ndata: {file: d.parquet, sha256: "${sha256(bytes)}", id: id, label: label}\nsplit: {rule: ` +
        `stratified-kfold, folds: 4, repeats: 3, seed: 5}\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy]\n`,
    });
    for (const threads of ['1', '2']) t.equal((await run(threads, ['folds', 'p.yaml', '--out', `p-${threads}.csv`], dir)).status, 0);
    t.equal(readFileSync(join(dir, 'p-2.csv'), 'utf8'), readFileSync(join(dir, 'p-1.csv'), 'utf8'), 'assignment CSV identical');
  },
);

t.test('a data hash computed on the second thread is checked like one computed here', async (t) => {
  const dir = tempDir({ 'p.yaml': demo.replace(/sha256: "914f[0-9a-f]+"/, `sha256: "${'0'.repeat(64)}"`) });
  const one = await run('1', ['validate', 'p.yaml'], dir);
  const two = await run('2', ['validate', 'p.yaml'], dir);
  t.equal(one.status, 1);
  t.match(one.stdout + one.stderr, '914fdee0');
  t.equal(two.stdout + two.stderr, one.stdout + one.stderr, 'same report');
});
