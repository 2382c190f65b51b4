/**
 * The row thread `run` starts before it loads its code (io/early-row-thread.ts), its early line
 * index, and fits from class moments on it: the same results as one thread, and nothing used that
 * belongs to another file. (Apart from threads.test.ts so that the two run side by side.)
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { MessageChannel, Worker } from 'node:worker_threads';
import t from 'tap';
import { cli, root, sha256, tempDir } from '../helpers.js';

const threadEnv = (threads: string) => ({ FOLDSEAL_THREADS: threads, FOLDSEAL_TRUSTED: join(root, 'protocols', 'data') });
/** In this process (the worker threads are real: the tests run compiled JavaScript), which is much quicker under tap. */
const run = async (threads: string, args: string[], cwd: string) => {
  const r = await cli(args, cwd, threadEnv(threads));
  return { status: r.code, stdout: r.stdout, stderr: r.stderr };
};
const demoData = join(root, 'protocols', 'data');
const demo = readFileSync(join(root, 'protocols', 'demo.yaml'), 'utf8').replaceAll('file: data/', `file: ${demoData}/`);

t.test('the row thread run starts early is taken for its own data file only, and closed otherwise', async (t) => {
  const { closeEarlyRowThread, startEarlyRowThread, takeEarlyRowThread } = await import('../../src/io/early-row-thread.js');
  const before = process.env.FOLDSEAL_THREADS;
  process.env.FOLDSEAL_THREADS = '2';
  t.teardown(() => {
    if (before === undefined) delete process.env.FOLDSEAL_THREADS;
    else process.env.FOLDSEAL_THREADS = before;
  });
  const dir = tempDir({ 'd.csv': 'id,x,y\na,1,p\n', 'p.yaml': 'foldseal: 1\ndata: {file: d.csv, id: id, label: y}\n' });
  const data = join(dir, 'd.csv');
  startEarlyRowThread(join(dir, 'p.yaml'), false);
  const taken = await takeEarlyRowThread(data, false);
  t.ok(taken, 'taken for its file');
  t.equal(
    taken!.sha256(new TextEncoder().encode('abc'))(),
    'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad',
    'and it works (FIPS 180-2 "abc")',
  );
  await taken!.close();
  t.equal(await takeEarlyRowThread(data, false), undefined, 'taken once');
  startEarlyRowThread(join(dir, 'p.yaml'), false);
  t.equal(await takeEarlyRowThread(join(dir, 'other.csv'), false), undefined, 'another file: not taken (and closed)');
  startEarlyRowThread(join(dir, 'p.yaml'), false);
  t.equal(await takeEarlyRowThread(data, true), undefined, 'read as Parquet after all: not taken');
  startEarlyRowThread(join(dir, 'p.yaml'), false);
  await closeEarlyRowThread();
  t.equal(await takeEarlyRowThread(data, false), undefined, 'closed when nobody took it');
  // A data file outside the protocol's folder: nothing is started without --allow-outside.
  const outside = tempDir({ 'p.yaml': `foldseal: 1\ndata: {file: ${data}, id: id, label: y}\n` });
  startEarlyRowThread(join(outside, 'p.yaml'), false);
  t.equal(await takeEarlyRowThread(data, false), undefined, 'outside the folder: none');
  startEarlyRowThread(join(outside, 'p.yaml'), true);
  const allowed = await takeEarlyRowThread(data, false);
  t.ok(allowed, 'with --allow-outside: started');
  await allowed?.close();
  startEarlyRowThread(join(dir, 'missing.yaml'), false);
  t.equal(await takeEarlyRowThread(data, false), undefined, 'an unreadable protocol: none');
});

t.test('a row thread the launcher started is taken over when the run wants one, and closed when it does not', async (t) => {
  const { closeEarlyRowThread, startEarlyRowThread, takeEarlyRowThread } = await import('../../src/io/early-row-thread.js');
  const slot = Symbol.for('foldseal.rowThread');
  const g = globalThis as Record<symbol, unknown>;
  // As bin/foldseal.cjs starts it (on the bundle's row-worker.js there; on the modules' here).
  const prestart = () => {
    const { port1, port2 } = new MessageChannel();
    const worker = new Worker(new URL('../../src/io/row-worker.js', import.meta.url), {
      workerData: { port: port2, parquet: false },
      transferList: [port2],
    });
    worker.unref();
    g[slot] = { worker, port: port1 };
    return new Promise<void>((resolve) => worker.once('exit', () => resolve()));
  };
  const before = process.env.FOLDSEAL_THREADS;
  t.teardown(() => {
    if (before === undefined) delete process.env.FOLDSEAL_THREADS;
    else process.env.FOLDSEAL_THREADS = before;
  });
  const dir = tempDir({ 'd.csv': 'id,x,y\na,1,p\n', 'p.yaml': 'foldseal: 1\ndata: {file: d.csv, id: id, label: y}\n' });
  process.env.FOLDSEAL_THREADS = '2';
  const exited = prestart();
  startEarlyRowThread(join(dir, 'p.yaml'), false);
  t.equal(g[slot], undefined, 'taken from where the launcher left it');
  const taken = await takeEarlyRowThread(join(dir, 'd.csv'), false);
  t.equal(
    taken!.sha256(new TextEncoder().encode('abc'))(),
    'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad',
    'the launcher\'s thread does the work (FIPS 180-2 "abc")',
  );
  await taken!.close();
  await exited;
  // One thread wanted (or a small table): the launcher's thread is closed at once.
  process.env.FOLDSEAL_THREADS = '1';
  const closed = prestart();
  startEarlyRowThread(join(dir, 'p.yaml'), false);
  await closed;
  t.equal(g[slot], undefined, 'not wanted: closed');
  // A run that ends before it looks at its data closes it too.
  const atEnd = prestart();
  await closeEarlyRowThread();
  await atEnd;
  t.pass('closed with the early thread');
});

t.test('fits from class moments on the thread that read the table: the same files as one thread, and the same fit error', async (t) => {
  // standardize, select and gaussian-nb all fit from class moments: with two threads they go to the row thread while this one audits.
  const dir = tempDir({ 'p.yaml': demo });
  const two = await run('2', ['run', 'p.yaml', '--out', 'res-2'], dir);
  t.equal(two.status, 0, two.stderr);
  const one = await run('1', ['run', 'p.yaml', '--out', 'res-1'], dir);
  t.equal(one.status, 0, one.stderr);
  for (const f of ['predictions.csv', 'results.json', 'models.json', 'applied.csv'])
    t.equal(readFileSync(join(dir, 'res-2', f), 'utf8'), readFileSync(join(dir, 'res-1', f), 'utf8'), f);
  // Every feature constant within its class: shrunken-centroid fails in its first fold, on either thread.
  const rows = Array.from({ length: 40 }, (_, i) => `r${i},${i % 2},${i % 2 ? 'p' : 'q'}`).join('\n');
  const data = `id,x,y\n${rows}\n`;
  const failing = tempDir({
    'd.csv': data,
    'p.yaml':
      `foldseal: 1\nname: constant\ndata: {file: d.csv, sha256: "${sha256(data)}", id: id, label: y}\n` +
      'split: {rule: stratified-kfold, folds: 4, seed: 1}\nmodel: {kind: shrunken-centroid}\nmetrics: [accuracy]\n',
  });
  const errTwo = await run('2', ['run', 'p.yaml', '--out', 'res'], failing);
  const errOne = await run('1', ['run', 'p.yaml', '--out', 'res'], failing);
  t.equal(errTwo.status, 1, errTwo.stderr);
  t.match(errTwo.stderr, 'every feature is constant within classes');
  t.equal(errTwo.stderr, errOne.stderr, 'the same error');
});

t.test('the line index the row thread makes early is used only for the very file, with its delimiter', async (t) => {
  const { startRowThread } = await import('../../src/io/row-helper.js');
  const { openIdentified } = await import('../../src/io/file-identity.js');
  const { closeSync, appendFileSync } = await import('node:fs');
  const { gzipSync } = await import('node:zlib');
  const text = 'id,x,y\na,1,p\nb,2,q\nc,3,p\n';
  const dir = tempDir({ 'd.csv': text, 'z.csv.gz': '' });
  writeFileSync(join(dir, 'z.csv.gz'), gzipSync(text));
  const path = join(dir, 'd.csv');
  const identity = (p: string) => {
    const o = openIdentified(p)!;
    closeSync(o.fd);
    return o.identity;
  };
  const thread = startRowThread();
  t.teardown(() => thread.close());
  thread.indexEarly(path, 0x2c);
  const got = thread.indexed(path, identity(path), 0x2c);
  t.equal(got?.ix.rows, 3, 'the rows');
  t.same(got?.ix.header, ['id', 'x', 'y'], 'the header');
  t.ok(got?.numbers && got.numbers.byteLength >= 3 * 2 * 8, 'room for the numbers of every column but the label');
  t.equal(thread.indexed(path, identity(path), 0x2c), undefined, 'taken once');
  thread.indexEarly(path, 0x2c);
  t.equal(thread.indexed(path, identity(path), 0x09), undefined, 'another delimiter: not used');
  thread.indexEarly(path, 0x2c);
  t.equal(thread.indexed(join(dir, 'other.csv'), identity(path), 0x2c), undefined, 'another file: not used');
  thread.indexEarly(join(dir, 'z.csv.gz'), 0x2c);
  t.equal(thread.indexed(join(dir, 'z.csv.gz'), identity(join(dir, 'z.csv.gz')), 0x2c), undefined, 'a compressed file: no index');
  thread.indexEarly(join(dir, 'missing.csv'), 0x2c);
  t.equal(thread.indexed(join(dir, 'missing.csv'), identity(path), 0x2c), undefined, 'no such file: no index');
  // Changed after it was indexed: its identity (size, modification time) is not the same any more.
  thread.indexEarly(path, 0x2c);
  const before = identity(path);
  await new Promise((r) => setTimeout(r, 20));
  appendFileSync(path, 'd,4,q\n');
  t.equal(thread.indexed(path, identity(path), 0x2c), undefined, 'a file changed since: not used');
  thread.indexEarly(path, 0x2c);
  t.equal(thread.indexed(path, before, 0x2c), undefined, 'nor under its old identity');
});
