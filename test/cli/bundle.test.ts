/**
 * The launcher users run (package.json's bin: bin/foldseal.cjs, which loads the bundle in dist/bin
 * with the V8 code cache the build made) is the same program as the modules of dist/src that the
 * other tests spawn: the same files from runs on every kind of worker thread, the same messages and
 * exit codes, the same report. An equivalence check between two builds of one program (the demo's
 * invented data suffice); the results themselves are checked against outside references elsewhere.
 * `npm run test:shipped` runs every spawning test through the launcher as well.
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, readFileSync, symlinkSync, truncateSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import t from 'tap';
import { CLI_HEAP_FLAGS } from '../../src/io/heap-flags.js';
import { SHARED_PARQUET_BYTES, SHARED_READ_BYTES } from '../../src/io/row-helper.js';
import { cli, root, shipped, tempDir } from '../helpers.js';

const bundleDir = join(root, 'dist', 'bin');

/**
 * The environment, with coverage off in the child: the bundle holds the dependencies' code too,
 * which the report would count as foldseal's (the modules' own coverage is the other tests'). tap
 * hooks every child process it can; this variable of its process tracking turns coverage off there.
 */
function plainEnv(extra: Record<string, string> = {}): NodeJS.ProcessEnv {
  return { ...process.env, NO_COLOR: '1', FOLDSEAL_TRUSTED: join(root, 'protocols', 'data'), _TAPJS_PROCESSINFO_COVERAGE_: '0', ...extra };
}

function spawn(entry: string, args: string[], cwd: string, extra: Record<string, string> = {}) {
  return spawnSync(process.execPath, [entry, ...args], { cwd, encoding: 'utf8', env: plainEnv(extra) });
}

/** The modules of dist/src, in this process (the same `invoke` their entry calls; worker threads are real). */
async function modules(args: string[], cwd: string, extra: Record<string, string> = {}) {
  const r = await cli(args, cwd, { FOLDSEAL_TRUSTED: join(root, 'protocols', 'data'), ...extra });
  return { status: r.code, stdout: r.stdout, stderr: r.stderr };
}

const demoData = join(root, 'protocols', 'data');
const demo = readFileSync(join(root, 'protocols', 'demo.yaml'), 'utf8').replaceAll('file: data/', `file: ${demoData}/`);
// An impute step has no class-moment form: these folds go to fold workers, the permutations to permutation workers.
const onWorkers = demo
  .replace('preprocess: [standardize,', 'preprocess: [{impute: {by: median}}, standardize,')
  .replace('verify:', 'statistics: {permutation: {count: 4, seed: 3, metric: roc-auc}}\nverify:');

t.test('the build made the bundle, its flags and a code cache V8 takes under them', async (t) => {
  for (const f of ['cli.js', 'row-worker.js', 'fold-worker.js', 'permutation-worker.js', 'cli.v8cache', 'package.json'])
    t.ok(existsSync(join(bundleDir, f)), f);
  t.same(
    JSON.parse(readFileSync(join(bundleDir, 'launch.json'), 'utf8')),
    { v8Flags: CLI_HEAP_FLAGS, twoThreadBytes: SHARED_READ_BYTES, twoThreadParquetBytes: SHARED_PARQUET_BYTES },
    "the command line's own heap flags and the sizes a table is read on two threads from",
  );
  t.notMatch(readFileSync(join(bundleDir, 'cli.js'), 'utf8').slice(0, 2), '#!', 'no #! line (the launcher wraps the file in a function)');
  const check = [
    "const { readFileSync } = require('node:fs'); const Module = require('node:module'); const { Script } = require('node:vm');",
    `const dir = ${JSON.stringify(bundleDir)};`,
    "require('node:v8').setFlagsFromString(JSON.parse(readFileSync(dir + '/launch.json', 'utf8')).v8Flags);",
    "const s = new Script(Module.wrap(readFileSync(dir + '/cli.js', 'utf8')), { filename: dir + '/cli.js', cachedData: readFileSync(dir + '/cli.v8cache') });",
    'console.log(s.cachedDataRejected);',
  ].join('\n');
  const r = spawnSync(process.execPath, ['-e', check], { encoding: 'utf8' });
  t.equal(r.stdout.trim(), 'false', r.stderr);
});

t.test('runs through the launcher write the same files as the modules: the row thread, fold and permutation workers', async (t) => {
  const dir = tempDir({ 'moments.yaml': demo, 'rows.yaml': onWorkers });
  for (const p of ['moments', 'rows']) {
    const a = spawn(shipped, ['run', `${p}.yaml`, '--out', `${p}-shipped`], dir, { FOLDSEAL_THREADS: '2' });
    const b = await modules(['run', `${p}.yaml`, '--out', `${p}-modules`], dir, { FOLDSEAL_THREADS: '2' });
    t.equal(a.status, 0, a.stderr);
    t.equal(b.status, 0, b.stderr);
    t.equal(a.stdout.replaceAll('-shipped', ''), b.stdout.replaceAll('-modules', ''), `${p}: the same summary`);
    for (const f of ['predictions.csv', 'results.json', 'models.json', 'applied.csv'])
      t.equal(readFileSync(join(dir, `${p}-shipped`, f), 'utf8'), readFileSync(join(dir, `${p}-modules`, f), 'utf8'), `${p}: ${f}`);
    const manifest = (m: string) => ({ ...JSON.parse(readFileSync(join(dir, m, 'manifest.json'), 'utf8')), created: undefined });
    t.same(manifest(`${p}-shipped`), manifest(`${p}-modules`), `${p}: the manifest but its creation time`);
  }
  // Both reports of one results folder (the manifests of two runs differ in their creation time).
  const report = spawn(shipped, ['report', 'rows-modules', '--out', 'r.html'], dir);
  t.equal(report.status, 0, `report imports its chart libraries from the bundle: ${report.stderr}`);
  t.equal((await modules(['report', 'rows-modules', '--out', 'm.html'], dir)).status, 0);
  t.equal(readFileSync(join(dir, 'r.html'), 'utf8'), readFileSync(join(dir, 'm.html'), 'utf8'), 'the same report');
});

t.test('a user error through the launcher: the same located message and exit code, no stack trace', async (t) => {
  const dir = tempDir({ 'p.yaml': demo.replace('folds: 5', 'folds: 1') });
  for (const args of [['run', 'p.yaml'], ['validate', 'missing.yaml'], ['no-such-command']]) {
    const a = spawn(shipped, args, dir);
    const b = await modules(args, dir);
    t.equal(a.status, b.status, `${args.join(' ')}: exit code ${b.status}`);
    t.not(a.status, 0, args.join(' '));
    t.equal(a.stderr, b.stderr, `${args.join(' ')}: the same message`);
    t.notMatch(a.stderr, /\n\s+at /, 'no stack trace');
  }
});

t.test('without the bundle (a build by tsc alone) the launcher runs the modules', async (t) => {
  const dir = tempDir();
  mkdirSync(join(dir, 'bin'));
  mkdirSync(join(dir, 'dist'));
  copyFileSync(shipped, join(dir, 'bin', 'foldseal.cjs'));
  symlinkSync(join(root, 'dist', 'src'), join(dir, 'dist', 'src'));
  const r = spawn(join(dir, 'bin', 'foldseal.cjs'), ['--version'], dir);
  t.equal(r.status, 0, r.stderr);
  t.equal(r.stdout.trim(), JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')).version);
});

t.test("the launcher starts `run`'s row thread early only for a protocol naming a large file in its own folder", async (t) => {
  const { namesLargeFile } = createRequire(import.meta.url)(shipped) as { namesLargeFile: (p: string, l: object) => boolean };
  const launch = { twoThreadBytes: 1000, twoThreadParquetBytes: 100 };
  const dir = tempDir({ 'small.csv': 'id,x\n', 'sub/p.yaml': '' });
  // Sparse files: the sizes count, not the bytes.
  for (const [name, size] of [
    ['big.csv', 1000],
    ['mid.parquet', 500],
    ['sub/big.tsv', 5000],
  ] as const) {
    writeFileSync(join(dir, name), '');
    truncateSync(join(dir, name), size);
  }
  const says = (text: string, where = 'p.yaml') => {
    writeFileSync(join(dir, where), text);
    return namesLargeFile(join(dir, where), launch);
  };
  t.equal(says('data: {file: big.csv, id: id}\n'), true, 'flow mapping');
  t.equal(says('data:\n  file: "big.csv"\n'), true, 'block mapping, quoted');
  t.equal(
    says('data: {file: small.csv}\nreconcile: {new-rows: {file: mid.parquet}}\n'),
    true,
    'any file; a Parquet file from its own size',
  );
  t.equal(says('data: {file: small.csv}\n'), false, 'a small file');
  t.equal(says('data: {file: ../big.csv}\n', 'sub/p.yaml'), false, 'not outside its folder');
  t.equal(says(`data: {file: ${join(dir, 'big.csv')}}\n`), false, 'not an absolute path');
  t.equal(says('data: {file: sub/big.tsv}\n'), true, 'a subfolder');
  t.equal(says('data: {file: nowhere.csv}\n'), false, 'no such file');
  t.equal(namesLargeFile(join(dir, 'no-protocol.yaml'), launch), false, 'no such protocol');
});
