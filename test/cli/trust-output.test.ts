/**
 * Trust, part 1: output folders and files — each loss of the trust issue reproduced on a
 * temporary folder and shown not to happen (folders foldseal did not write, kill -9 mid-swap,
 * two writers, full and read-only disks, keygen both-or-neither).
 */
import { spawn, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { bin, cli, sha256, tempDir } from '../helpers.js';
import { complete, csv, project, protocolFor } from './trust-fixtures.js';
import { manifestListing, openOutputDir } from '../../src/io/output-dir.js';

t.test('run --out . --force refuses a folder foldseal did not write; nothing is deleted', async (t) => {
  const dir = project();
  mkdirSync(join(dir, '.git'));
  writeFileSync(join(dir, '.git', 'HEAD'), 'ref: refs/heads/main\n');
  const before = readdirSync(dir).sort();
  for (const out of ['.', 'data']) {
    const r = await cli(['run', 'demo.yaml', '--out', out, '--force'], dir);
    t.equal(r.code, 2, `--out ${out}`);
    t.match(
      r.stderr,
      /error: .* no foldseal manifest, so foldseal will not replace it \(--force replaces only a results folder foldseal wrote\)/,
    );
  }
  t.same(readdirSync(dir).sort(), before, 'the protocol, the data and .git are all still there');
  t.equal(readFileSync(join(dir, '.git', 'HEAD'), 'utf8'), 'ref: refs/heads/main\n');
});

t.test('a results folder with a file foldseal did not write is not replaced, --force or not', async (t) => {
  const dir = project();
  t.equal((await cli(['run', 'demo.yaml', '--out', 'res'], dir)).code, 0);
  writeFileSync(join(dir, 'res', 'notes.txt'), 'my notes\n');
  const r = await cli(['run', 'demo.yaml', '--out', 'res', '--force'], dir);
  t.equal(r.code, 2);
  t.match(r.stderr, 'res: error: res holds 1 entry foldseal did not write (notes.txt), so foldseal will not replace it');
  t.equal(readFileSync(join(dir, 'res', 'notes.txt'), 'utf8'), 'my notes\n');
});

t.test('an empty folder is written into; a results folder of ours needs --force and is swapped whole', async (t) => {
  const dir = project();
  mkdirSync(join(dir, 'empty'));
  t.equal((await cli(['run', 'demo.yaml', '--out', 'empty'], dir)).code, 0);
  t.ok(complete(join(dir, 'empty')));
  const again = await cli(['run', 'demo.yaml', '--out', 'empty'], dir);
  t.equal(again.code, 2);
  t.match(again.stderr, 'empty: error: empty already exists');
  t.equal((await cli(['run', 'demo.yaml', '--out', 'empty', '--force'], dir)).code, 0);
  t.ok(complete(join(dir, 'empty')));
  t.same(
    readdirSync(dir).filter((e) => e.includes('foldseal')),
    [],
    'no temporary folder or lock left behind',
  );
});

t.test('a manifest is read for its version and files from its head, or whole when not in canonical order', async (t) => {
  const dir = project();
  t.equal((await cli(['run', 'demo.yaml', '--out', 'res'], dir)).code, 0);
  const text = readFileSync(join(dir, 'res', 'manifest.json'), 'utf8');
  const whole = JSON.parse(text);
  const head = manifestListing(text)!;
  t.same(head.files, whole.files, 'the files, from the text before "protocol"');
  t.equal(head['foldseal-manifest'], whole['foldseal-manifest']);
  t.notOk('split' in head, 'the assignment was not parsed');
  // Members in another order (a manifest pretty-printed or rewritten by hand): parsed whole.
  const { files, ...rest } = whole;
  const reordered = JSON.stringify({ ...rest, files }, null, 1);
  t.same(manifestListing(reordered), JSON.parse(reordered));
  // The sequence searched for, inside a string, is escaped and never cut at.
  const tricky = JSON.stringify({ a: ',"protocol":', ...whole });
  t.same(manifestListing(tricky)?.files, whole.files);
  t.equal((manifestListing(tricky) as { a?: string }).a, ',"protocol":');
  // Such a folder is still ours: --force replaces it.
  writeFileSync(join(dir, 'res', 'manifest.json'), reordered);
  t.equal((await cli(['run', 'demo.yaml', '--out', 'res', '--force'], dir)).code, 0);
  t.ok(complete(join(dir, 'res')));
  // Past the first 256 KB read from the file: the head alone, or the whole file when the head is not it.
  const big = { ...JSON.parse(readFileSync(join(dir, 'res', 'manifest.json'), 'utf8')), zzz: 'x'.repeat(300_000) };
  for (const [what, text] of [
    ['canonical', JSON.stringify(big)],
    ['reordered', JSON.stringify({ zzz: big.zzz, ...big }, null, 1)],
  ] as const) {
    writeFileSync(join(dir, 'res', 'manifest.json'), text);
    t.equal((await cli(['run', 'demo.yaml', '--out', 'res', '--force'], dir)).code, 0, `a large ${what} manifest is ours`);
  }
  // Read from its head only, a large manifest still lists what the folder may hold: a file of the
  // user's beside it is refused, --force or not, and stays.
  writeFileSync(join(dir, 'res', 'manifest.json'), JSON.stringify(big));
  writeFileSync(join(dir, 'res', 'notes.txt'), 'mine');
  const refused = await cli(['run', 'demo.yaml', '--out', 'res', '--force'], dir);
  t.equal(refused.code, 2);
  t.match(refused.stderr, 'holds 1 entry foldseal did not write (notes.txt)');
  t.equal(readFileSync(join(dir, 'res', 'notes.txt'), 'utf8'), 'mine', "the user's file is kept");
});

t.test('kill -9 at any moment: the old or the new complete folder, and the next run cleans up', async (t) => {
  const dir = project();
  t.equal((await cli(['run', 'demo.yaml', '--out', 'res'], dir)).code, 0);
  const start = Date.now();
  const r = spawnSync(process.execPath, [bin, 'run', 'demo.yaml', '--out', 'res', '--force'], { cwd: dir });
  const span = Math.max(60, Date.now() - start);
  t.equal(r.status, 0);
  let killedMidway = 0;
  for (let i = 0; i < 6; i++) {
    const child = spawn(process.execPath, [bin, 'run', 'demo.yaml', '--out', 'res', '--force'], { cwd: dir, stdio: 'ignore' });
    const delay = Math.floor((span * (i + 0.5)) / 6);
    const code = await new Promise<number | null>((done) => {
      const timer = setTimeout(() => child.kill('SIGKILL'), delay);
      child.on('exit', (c) => {
        clearTimeout(timer);
        done(c);
      });
    });
    if (code === null) killedMidway++;
    const aside = readdirSync(dir).filter((e) => e.startsWith('.res.foldseal-old-'));
    if (existsSync(join(dir, 'res'))) t.ok(complete(join(dir, 'res')), `after a kill at ${delay} ms the folder is complete`);
    else
      t.ok(
        aside.some((a) => complete(join(dir, a, 'previous'))),
        `after a kill at ${delay} ms the previous folder is kept aside, complete`,
      );
  }
  t.ok(killedMidway > 0, `${killedMidway} of 6 runs were killed before they finished`);
  const next = await cli(['run', 'demo.yaml', '--out', 'res', '--force'], dir);
  t.equal(next.code, 0, next.stderr);
  t.ok(complete(join(dir, 'res')));
  t.same(
    readdirSync(dir).filter((e) => e.startsWith('.res.')),
    [],
    'leftovers of the killed runs are gone',
  );
});

t.test('a previous folder left aside by a crash is put back by the next run', async (t) => {
  const dir = project();
  t.equal((await cli(['run', 'demo.yaml', '--out', 'res'], dir)).code, 0);
  const recorded = readFileSync(join(dir, 'res', 'manifest.json'), 'utf8');
  mkdirSync(join(dir, '.res.foldseal-old-abc123'));
  cpSync(join(dir, 'res'), join(dir, '.res.foldseal-old-abc123', 'previous'), { recursive: true });
  cpSync(join(dir, 'res'), join(dir, '.res.foldseal-new-def456'), { recursive: true });
  writeFileSync(join(dir, '.res.foldseal-new-def456', 'predictions.csv'), 'half');
  // The crash came between the two renames: nothing under the name.
  spawnSync('rm', ['-rf', join(dir, 'res')]);
  const r = await cli(['run', 'demo.yaml', '--out', 'res'], dir);
  t.equal(r.code, 2, 'the restored folder is ours, so replacing it still needs --force');
  t.equal(readFileSync(join(dir, 'res', 'manifest.json'), 'utf8'), recorded, 'the previous output is back under its name');
  t.same(
    readdirSync(dir).filter((e) => e.startsWith('.res.')),
    [],
  );
});

t.test('two writers: a live lock holder makes the second refuse; a dead one is taken over', async (t) => {
  const dir = project();
  writeFileSync(join(dir, '.res.foldseal-lock'), `${process.pid}\n`);
  const busy = await cli(['run', 'demo.yaml', '--out', 'res'], dir);
  t.equal(busy.code, 2);
  t.match(busy.stderr, `res: error: another foldseal process (pid ${process.pid}) is writing res`);
  t.notOk(existsSync(join(dir, 'res')));
  const gone = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
  writeFileSync(join(dir, '.res.foldseal-lock'), `${gone.stdout}\n`);
  const r = await cli(['run', 'demo.yaml', '--out', 'res'], dir);
  t.equal(r.code, 0, r.stderr);
  t.ok(complete(join(dir, 'res')));
  t.notOk(existsSync(join(dir, '.res.foldseal-lock')));
  // Two real runs at once: each ends with the complete folder or a clear refusal.
  const both = await Promise.all(
    [0, 1].map(
      () =>
        new Promise<string>((done) => {
          const c = spawn(process.execPath, [bin, 'run', 'demo.yaml', '--out', 'res', '--force'], { cwd: dir });
          let err = '';
          c.stderr.on('data', (d) => (err += d));
          c.on('exit', (code) => done(code === 0 ? 'ok' : /another foldseal process/.test(err) ? 'busy' : `failed ${code}: ${err}`));
        }),
    ),
  );
  t.ok(
    both.every((b) => b === 'ok' || b === 'busy'),
    both.join(', '),
  );
  t.ok(complete(join(dir, 'res')));
});

/** Mounts a small tmpfs (root only); undefined where mounting is not allowed. */
function tmpfs(size: string, readOnly = false): string | undefined {
  const at = tempDir();
  const r = spawnSync('mount', ['-t', 'tmpfs', '-o', `size=${size}${readOnly ? ',ro' : ''}`, 'tmpfs', at]);
  return r.status === 0 ? at : undefined;
}

t.test('file outputs: missing folder, a folder in the way, read-only, full disk — clear errors, nothing half-written', async (t) => {
  const dir = tempDir({ 'data.csv': csv, 'p.yaml': protocolFor('out') });
  t.equal((await cli(['run', 'p.yaml', '--out', 'res'], dir)).code, 0);
  mkdirSync(join(dir, 'a-folder'));
  const commands: [string, (out: string) => string[]][] = [
    ['folds', (out) => ['folds', 'p.yaml', '--out', out]],
    ['apply', (out) => ['apply', 'res', 'data.csv', '--out', out]],
    ['init', (out) => ['init', 'data.csv', '--label', 'label', '--id', 'id', '--out', out]],
  ];
  for (const [name, args] of commands) {
    const missing = await cli(args('no/such/out.csv'), dir);
    t.equal(missing.code, 2, `${name}: missing parent`);
    t.match(missing.stderr, 'error: no/such/out.csv cannot be written: the folder no/such does not exist');
    const folder = await cli(args('a-folder'), dir);
    t.equal(folder.code, 2, `${name}: a folder in place of the file`);
    t.match(folder.stderr, 'error: a-folder is a folder; give a file name');
    t.notMatch(missing.stderr + folder.stderr, /internal error|at .*\.js:\d+/, `${name}: no stack trace`);
  }
  const full = tmpfs('16k');
  if (!full) {
    t.comment('skipped: mounting a small tmpfs needs root; the full-disk and read-only cases are not run');
    return;
  }
  try {
    try {
      writeFileSync(join(full, 'filler'), Buffer.alloc(64 * 1024));
    } catch {
      // The disk is now full.
    }
    for (const [name, args] of commands) {
      const r = await cli(args(join(full, 'out.csv')), dir);
      t.equal(r.code, 2, `${name}: full disk`);
      t.match(r.stderr, 'cannot be written: the disk is full', name);
      t.same(readdirSync(full), ['filler'], `${name}: no partial file left`);
    }
    const key = await cli(['keygen', '--out', join(full, 'k')]);
    t.equal(key.code, 2);
    t.same(readdirSync(full), ['filler'], 'keygen: neither key file is left');
  } finally {
    spawnSync('umount', [full]);
  }
  const ro = tmpfs('64k', true);
  /* c8 ignore next -- mounting worked a moment ago */
  if (!ro) return;
  try {
    const r = await cli(['folds', 'p.yaml', '--out', join(ro, 'f.csv')], dir);
    t.equal(r.code, 2);
    t.match(r.stderr, 'cannot be written (the file system is read-only)');
  } finally {
    spawnSync('umount', [ro]);
  }
});

t.test('keygen writes both key files or neither, and names a missing folder', async (t) => {
  const dir = tempDir();
  const missing = await cli(['keygen', '--out', 'no/dir/k'], dir);
  t.equal(missing.code, 2);
  t.equal(missing.stderr, 'no/dir/k.key: error: no/dir/k.key cannot be written: the folder no/dir does not exist\n');
  writeFileSync(join(dir, 'k.pub'), "someone else's\n");
  const clash = await cli(['keygen', '--out', 'k'], dir);
  t.equal(clash.code, 2);
  t.match(clash.stderr, 'k.pub: error: k.pub already exists');
  t.notOk(existsSync(join(dir, 'k.key')), 'no private key without its public half');
  t.equal(readFileSync(join(dir, 'k.pub'), 'utf8'), "someone else's\n");
});

t.test("leftover cleaning touches only what foldseal leaves: a user's entries under such names stay", async (t) => {
  const dir = project();
  mkdirSync(join(dir, '.res.foldseal-new-mine', 'sub'), { recursive: true });
  writeFileSync(join(dir, '.res.foldseal-new-mine', 'sub', 'notes.txt'), 'mine\n');
  writeFileSync(join(dir, '.res.foldseal-old-file'), 'a plain file, not a folder foldseal set aside\n');
  mkdirSync(join(dir, '.res.foldseal-old-other'));
  writeFileSync(join(dir, '.res.foldseal-old-other', 'thesis.tex'), 'mine\n');
  const r = await cli(['run', 'demo.yaml', '--out', 'res'], dir);
  t.equal(r.code, 0, r.stderr);
  t.ok(complete(join(dir, 'res')));
  t.equal(readFileSync(join(dir, '.res.foldseal-new-mine', 'sub', 'notes.txt'), 'utf8'), 'mine\n');
  t.ok(existsSync(join(dir, '.res.foldseal-old-file')));
  t.equal(readFileSync(join(dir, '.res.foldseal-old-other', 'thesis.tex'), 'utf8'), 'mine\n');
});

t.test('predictions.csv is written into the new folder as it is made; a failure leaves nothing behind', async (t) => {
  const dir = project();
  // A protocol that fails validation: the results folder is never opened.
  writeFileSync(join(dir, 'bad.yaml'), readFileSync(join(dir, 'demo.yaml'), 'utf8').replace('folds: 5', 'folds: 500'));
  const bad = await cli(['run', 'bad.yaml', '--out', 'out/res'], dir);
  t.equal(bad.code, 1);
  t.notOk(existsSync(join(dir, 'out')), 'no folder was made for a run that could not start');
  const out = await openOutputDir(join(dir, 'res'), false, 'res');
  const text = 'id,repeat\na,1\n'.repeat(1000);
  const pieces = [Buffer.from(text.slice(0, 7)), Buffer.from(text.slice(7))];
  t.equal(out.stream('predictions.csv', pieces), sha256(text), 'hashed as written');
  t.ok(existsSync(join(dir, '.res.foldseal-lock')), 'the folder is locked while it is written');
  await out.abort();
  await out.abort();
  t.same(
    readdirSync(dir).filter((e) => e.startsWith('.res') || e === 'res'),
    [],
    'aborted: no folder, no new folder, no lock',
  );
  const again = await openOutputDir(join(dir, 'res'), false, 'res');
  again.stream('predictions.csv', [Buffer.from(text)]);
  await again.commit({ 'manifest.json': '{}\n' });
  t.equal(readFileSync(join(dir, 'res', 'predictions.csv'), 'utf8'), text);
  // After the commit the lock is another writer's to take: a late abort must not delete theirs.
  writeFileSync(join(dir, '.res.foldseal-lock'), '1\n');
  await again.abort();
  t.ok(existsSync(join(dir, '.res.foldseal-lock')), "an abort after the commit leaves another writer's lock alone");
  t.ok(existsSync(join(dir, 'res', 'predictions.csv')));
});

t.test('a results folder that changed while the folds ran is not replaced: the file put there stays', async (t) => {
  const dir = project();
  t.equal((await cli(['run', 'demo.yaml', '--out', 'res'], dir)).code, 0);
  const out = await openOutputDir(join(dir, 'res'), true, 'res');
  out.stream('predictions.csv', [Buffer.from('id\n')]);
  // While the run fits its folds, someone saves a file into the old results folder.
  writeFileSync(join(dir, 'res', 'notes.txt'), 'mine\n');
  await t.rejects(out.commit({ 'manifest.json': '{}\n' }), {
    message: /res holds 1 entry foldseal did not write \(notes\.txt\) \(it changed while foldseal ran\)/,
  });
  t.equal(readFileSync(join(dir, 'res', 'notes.txt'), 'utf8'), 'mine\n', 'the file put there is kept');
  t.ok(complete(join(dir, 'res')), 'and the old results with it');
  t.same(
    readdirSync(dir).filter((e) => e.startsWith('.res')),
    [],
    'no new folder and no lock are left',
  );
});
