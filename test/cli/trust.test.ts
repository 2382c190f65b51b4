/**
 * Trust: each attack or loss of the trust issue reproduced on a temporary folder, and shown to
 * fail. Output folders, file outputs, the gate's protocol discovery, sealed rows by content,
 * re-runs of untrusted manifests, device files, a manifest checked against itself, and new rows
 * under a training id.
 */
import { spawn, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { canonicalJson } from '../../src/manifest/canonical.js';
import { bin, cli, root, sha256, smallCsv, tempDir } from '../helpers.js';

const demoDir = join(root, 'protocols');
const demoText = readFileSync(join(demoDir, 'demo.yaml'), 'utf8');

/** A project folder holding the demo protocol and its data (no lock, so no team rules). */
function project(extra: Record<string, string> = {}): string {
  const dir = tempDir(extra);
  cpSync(join(demoDir, 'data'), join(dir, 'data'), { recursive: true });
  writeFileSync(join(dir, 'demo.yaml'), demoText);
  return dir;
}

/** Every file the manifest lists is there with its recorded hash. */
function complete(dir: string): boolean {
  try {
    const m = JSON.parse(readFileSync(join(dir, 'manifest.json'), 'utf8'));
    return Object.entries(m.files as Record<string, string>).every(([f, h]) => sha256(readFileSync(join(dir, f))) === h);
  } catch {
    return false;
  }
}

t.test('run --out . --force refuses a folder foldseal did not write; nothing is deleted', async (t) => {
  const dir = project();
  mkdirSync(join(dir, '.git'));
  writeFileSync(join(dir, '.git', 'HEAD'), 'ref: refs/heads/main\n');
  const before = readdirSync(dir).sort();
  for (const out of ['.', 'data']) {
    const r = cli(['run', 'demo.yaml', '--out', out, '--force'], dir);
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
  t.equal(cli(['run', 'demo.yaml', '--out', 'res'], dir).code, 0);
  writeFileSync(join(dir, 'res', 'notes.txt'), 'my notes\n');
  const r = cli(['run', 'demo.yaml', '--out', 'res', '--force'], dir);
  t.equal(r.code, 2);
  t.match(r.stderr, 'res: error: res holds 1 entry foldseal did not write (notes.txt), so foldseal will not replace it');
  t.equal(readFileSync(join(dir, 'res', 'notes.txt'), 'utf8'), 'my notes\n');
});

t.test('an empty folder is written into; a results folder of ours needs --force and is swapped whole', async (t) => {
  const dir = project();
  mkdirSync(join(dir, 'empty'));
  t.equal(cli(['run', 'demo.yaml', '--out', 'empty'], dir).code, 0);
  t.ok(complete(join(dir, 'empty')));
  const again = cli(['run', 'demo.yaml', '--out', 'empty'], dir);
  t.equal(again.code, 2);
  t.match(again.stderr, 'empty: error: empty already exists');
  t.equal(cli(['run', 'demo.yaml', '--out', 'empty', '--force'], dir).code, 0);
  t.ok(complete(join(dir, 'empty')));
  t.same(
    readdirSync(dir).filter((e) => e.includes('foldseal')),
    [],
    'no temporary folder or lock left behind',
  );
});

t.test('kill -9 at any moment: the old or the new complete folder, and the next run cleans up', async (t) => {
  const dir = project();
  t.equal(cli(['run', 'demo.yaml', '--out', 'res'], dir).code, 0);
  const start = Date.now();
  const r = spawnSync(process.execPath, [bin, 'run', 'demo.yaml', '--out', 'res', '--force'], { cwd: dir });
  const span = Math.max(60, Date.now() - start);
  t.equal(r.status, 0);
  let killedMidway = 0;
  for (let i = 0; i < 24; i++) {
    const child = spawn(process.execPath, [bin, 'run', 'demo.yaml', '--out', 'res', '--force'], { cwd: dir, stdio: 'ignore' });
    const delay = Math.floor((span * (i + 0.5)) / 24);
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
  t.ok(killedMidway > 0, `${killedMidway} of 24 runs were killed before they finished`);
  const next = cli(['run', 'demo.yaml', '--out', 'res', '--force'], dir);
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
  t.equal(cli(['run', 'demo.yaml', '--out', 'res'], dir).code, 0);
  const recorded = readFileSync(join(dir, 'res', 'manifest.json'), 'utf8');
  mkdirSync(join(dir, '.res.foldseal-old-abc123'));
  cpSync(join(dir, 'res'), join(dir, '.res.foldseal-old-abc123', 'previous'), { recursive: true });
  cpSync(join(dir, 'res'), join(dir, '.res.foldseal-new-def456'), { recursive: true });
  writeFileSync(join(dir, '.res.foldseal-new-def456', 'predictions.csv'), 'half');
  // The crash came between the two renames: nothing under the name.
  spawnSync('rm', ['-rf', join(dir, 'res')]);
  const r = cli(['run', 'demo.yaml', '--out', 'res'], dir);
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
  const busy = cli(['run', 'demo.yaml', '--out', 'res'], dir);
  t.equal(busy.code, 2);
  t.match(busy.stderr, `res: error: another foldseal process (pid ${process.pid}) is writing res`);
  t.notOk(existsSync(join(dir, 'res')));
  const gone = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
  writeFileSync(join(dir, '.res.foldseal-lock'), `${gone.stdout}\n`);
  const r = cli(['run', 'demo.yaml', '--out', 'res'], dir);
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

const csv = smallCsv(20);
const protocolFor = (name: string, data = 'data.csv', dataText = csv) =>
  `foldseal: 1\nname: ${name}\ndata: {file: ${data}, sha256: "${sha256(dataText)}", id: id, label: label, features: [a, b, c]}\nsplit: {rule: stratified-kfold, folds: 2, seed: 7}\nmodel: {kind: gaussian-nb}\n`;

/** Mounts a small tmpfs (root only); undefined where mounting is not allowed. */
function tmpfs(size: string, readOnly = false): string | undefined {
  const at = tempDir();
  const r = spawnSync('mount', ['-t', 'tmpfs', '-o', `size=${size}${readOnly ? ',ro' : ''}`, 'tmpfs', at]);
  return r.status === 0 ? at : undefined;
}

t.test('file outputs: missing folder, a folder in the way, read-only, full disk — clear errors, nothing half-written', async (t) => {
  const dir = tempDir({ 'data.csv': csv, 'p.yaml': protocolFor('out') });
  t.equal(cli(['run', 'p.yaml', '--out', 'res'], dir).code, 0);
  mkdirSync(join(dir, 'a-folder'));
  const commands: [string, (out: string) => string[]][] = [
    ['folds', (out) => ['folds', 'p.yaml', '--out', out]],
    ['apply', (out) => ['apply', 'res', 'data.csv', '--out', out]],
    ['init', (out) => ['init', 'data.csv', '--label', 'label', '--id', 'id', '--out', out]],
  ];
  for (const [name, args] of commands) {
    const missing = cli(args('no/such/out.csv'), dir);
    t.equal(missing.code, 2, `${name}: missing parent`);
    t.match(missing.stderr, 'error: no/such/out.csv cannot be written: the folder no/such does not exist');
    const folder = cli(args('a-folder'), dir);
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
      const r = cli(args(join(full, 'out.csv')), dir);
      t.equal(r.code, 2, `${name}: full disk`);
      t.match(r.stderr, 'cannot be written: the disk is full', name);
      t.same(readdirSync(full), ['filler'], `${name}: no partial file left`);
    }
    const key = cli(['keygen', '--out', join(full, 'k')]);
    t.equal(key.code, 2);
    t.same(readdirSync(full), ['filler'], 'keygen: neither key file is left');
  } finally {
    spawnSync('umount', [full]);
  }
  const ro = tmpfs('64k', true);
  /* c8 ignore next -- mounting worked a moment ago */
  if (!ro) return;
  try {
    const r = cli(['folds', 'p.yaml', '--out', join(ro, 'f.csv')], dir);
    t.equal(r.code, 2);
    t.match(r.stderr, 'cannot be written (the file system is read-only)');
  } finally {
    spawnSync('umount', [ro]);
  }
});

t.test('keygen writes both key files or neither, and names a missing folder', async (t) => {
  const dir = tempDir();
  const missing = cli(['keygen', '--out', 'no/dir/k'], dir);
  t.equal(missing.code, 2);
  t.equal(missing.stderr, 'no/dir/k.key: error: no/dir/k.key cannot be written: the folder no/dir does not exist\n');
  writeFileSync(join(dir, 'k.pub'), "someone else's\n");
  const clash = cli(['keygen', '--out', 'k'], dir);
  t.equal(clash.code, 2);
  t.match(clash.stderr, 'k.pub: error: k.pub already exists');
  t.notOk(existsSync(join(dir, 'k.key')), 'no private key without its public half');
  t.equal(readFileSync(join(dir, 'k.pub'), 'utf8'), "someone else's\n");
});

t.test('the gate finds protocols by parsing, however the key is spelled', async (t) => {
  const data = { 'data/data.csv': csv };
  const body = protocolFor('x', '../data/data.csv').split('\n').slice(1).join('\n');
  const variants: Record<string, string> = {
    'protocols/bom.yaml': '\ufeff' + protocolFor('bom', '../data/data.csv'),
    'protocols/quoted.yaml': `"foldseal": 1\n${body.replace('name: x', 'name: quoted')}`,
    'protocols/escaped.yaml': `"\\x66oldseal": 1\n${body.replace('name: x', 'name: escaped')}`,
    'protocols/explicit.yml': `? foldseal\n: 1\n${body.replace('name: x', 'name: explicit')}`,
    'protocols/flow.yaml': `{foldseal: 1, name: flow, data: {file: ../data/data.csv, sha256: "${sha256(csv)}", id: id, label: label}, split: {rule: kfold, folds: 2, seed: 1}, model: {kind: gaussian-nb}}\n`,
    'protocols/json.json': JSON.stringify({
      '\u0066oldseal': 1,
      name: 'json',
      data: { file: '../data/data.csv', sha256: sha256(csv), id: 'id', label: 'label' },
      split: { rule: 'kfold', folds: 2, seed: 1 },
      model: { kind: 'gaussian-nb' },
    }),
    'protocols/not-a-protocol.yaml': 'title: notes that mention foldseal\n',
    'package.json': '{"name": "x"}',
  };
  const dir = tempDir({ ...data, ...variants });
  for (const path of Object.keys(variants).filter((p) => p.startsWith('protocols/') && !p.includes('not-a'))) {
    t.equal(cli(['validate', path], dir).code, 0, `run would accept ${path}`);
  }
  const r = cli(['check', '.'], dir);
  t.match(r.stderr, '6 protocols checked', r.stderr);
  const bad = cli(['run', 'p.txt'], tempDir({ 'p.txt': protocolFor('txt') }));
  t.equal(bad.code, 2, 'run refuses a protocol the gate would not look for');
  t.match(bad.stderr, 'does not end in .yaml, .yml or .json');
});

t.test('skipped folders are named in the summary; the lock policy adds folders to skip or to search', async (t) => {
  const dir = tempDir({
    'data/data.csv': csv,
    'p/one.yaml': protocolFor('one', '../data/data.csv'),
    '.hidden/two.yaml': protocolFor('two', '../data/data.csv'),
    'scratch/three.yaml': protocolFor('three', '../data/data.csv'),
    'node_modules/m/four.yaml': protocolFor('four', '../../data/data.csv'),
  });
  const first = cli(['check', '.'], dir);
  t.match(
    first.stderr,
    "2 protocols checked: 0 errors, 1 warning; not searched: .hidden, node_modules (add folders to the lock's policy.include to search them)",
  );
  t.equal(cli(['lock', '.'], dir).code, 0);
  const lockPath = join(dir, 'foldseal.lock.json');
  const lock = JSON.parse(readFileSync(lockPath, 'utf8'));
  lock.policy = { skip: ['scratch'], include: ['.hidden'] };
  writeFileSync(lockPath, JSON.stringify(lock));
  const r = cli(['check', '.'], dir);
  t.match(r.stderr, '2 protocols checked', r.stderr);
  t.match(r.stderr, 'not searched: node_modules, scratch');
  t.match(r.stderr, '.hidden/two.yaml');
  t.match(r.stderr, '.hidden/two.yaml is not in the lock');
  const run = cli(['run', 'scratch/three.yaml', '--out', 'res'], dir);
  t.equal(run.code, 1, 'run refuses a protocol the gate does not search');
  t.match(run.stderr, 'scratch/three.yaml lies in a folder that the repository gate of . does not search');
});

t.test('sealed rows are sealed by content: a copy under new ids is caught; run refuses like check; refit keeps off them', async (t) => {
  const sealedIds = 'id\nr1\nr2\nr3\nr4\n';
  const pinned =
    'id,repeat,fold\n' +
    Array.from({ length: 20 }, (_, i) => `r${i + 1},1,${i < 4 ? 1 : 2}`)
      .sort()
      .join('\n') +
    '\n';
  const finalP = `foldseal: 1\nname: final\nfinal: true\ndata: {file: data/data.csv, sha256: "${sha256(csv)}", id: id, label: label, features: [a, b, c]}\nsplit: {pinned: {file: splits/final.csv, sha256: "${sha256(pinned)}"}}\npreprocess: [standardize]\nmodel: {kind: gaussian-nb}\n`;
  const rows = csv.trimEnd().split('\n');
  const copied = [rows[0], ...rows.slice(5), ...rows.slice(1, 5).map((l) => l.replace(/^r(\d+),/, 'copy$1,'))].join('\n') + '\n';
  const dir = tempDir({
    'data/data.csv': csv,
    'data/dev.csv': copied,
    'splits/final.ids': sealedIds,
    'splits/final.csv': pinned,
    'final.yaml': finalP,
    'dev.yaml': protocolFor('dev', 'data/dev.csv', copied),
  });
  writeFileSync(
    join(dir, 'foldseal.lock.json'),
    JSON.stringify({ 'foldseal-lock': 1, sealed: { file: 'splits/final.ids', sha256: sha256(sealedIds) }, protocols: {} }),
  );
  const lock = cli(['lock', '.'], dir);
  t.equal(lock.code, 0, lock.stderr);
  t.match(lock.stdout, 'sealed rows: 4 content digests recorded');
  t.equal(JSON.parse(readFileSync(join(dir, 'foldseal.lock.json'), 'utf8')).sealed.rows.length, 4);
  const r = cli(['check', '.'], dir);
  t.equal(r.code, 1);
  t.match(
    r.stderr,
    'dev.yaml:3:14: error: dev has 4 rows in data/dev.csv with the same label and feature values as sealed rows, under other ids: copy1, copy2, copy3, copy4',
  );
  // The final data is gone: the digests in the lock still catch the copy.
  writeFileSync(join(dir, 'final.yaml'), finalP.replace('final: true\n', 'final: true\ndescription: moved\n'));
  const dev = cli(['run', 'dev.yaml', '--out', 'res-dev'], dir);
  t.equal(dev.code, 1, 'run refuses to test on sealed rows in a locked repository');
  t.match(dev.stderr, 'same label and feature values as sealed rows');
  t.notOk(existsSync(join(dir, 'res-dev')));
  const refit = cli(['run', 'final.yaml', '--out', 'res-final', '--refit'], dir);
  t.equal(refit.code, 0, refit.stderr);
  const models = JSON.parse(readFileSync(join(dir, 'res-final', 'models.json'), 'utf8'));
  const train = rows.slice(5).map((l) => Number(l.split(',')[3]));
  const mean = train.reduce((s, v) => s + v, 0) / train.length;
  const fitted = JSON.stringify(models.refit.pipeline);
  t.ok(
    fitted.includes(String(mean)),
    `the refit standardize mean of feature a is the training rows' mean ${mean} (not the mean over all rows, ${10.5})`,
  );
  t.notOk(fitted.includes('10.5'), 'the mean over all 20 rows, sealed ones included, is not used');
});

t.test('verify --rerun runs only a pinned signature, reads only inside the review folder, never a device', async (t) => {
  const dir = project();
  t.equal(cli(['keygen', '--out', 'author'], dir).code, 0);
  t.equal(cli(['run', 'demo.yaml', '--out', 'signed', '--key', 'author.key'], dir).code, 0);
  t.equal(cli(['run', 'demo.yaml', '--out', 'unsigned'], dir).code, 0);
  const unpinned = cli(['verify', 'signed/manifest.json', '--rerun', '--allow-unpinned'], dir);
  t.equal(unpinned.code, 1);
  t.match(unpinned.stderr, 'error: the manifest is not signed by a pinned key, so its protocol was not re-run');
  t.notMatch(unpinned.stdout, 'rerun:');
  const unsigned = cli(['verify', 'unsigned/manifest.json', '--rerun'], dir);
  t.equal(unsigned.code, 1);
  t.match(unsigned.stderr, 'the manifest is not validly signed, so its protocol was not re-run');
  const allowed = cli(['verify', 'unsigned/manifest.json', '--rerun', '--allow-unsigned', '--allow-unpinned'], dir);
  t.equal(allowed.code, 0, allowed.stderr);
  t.match(allowed.stdout, /identical\n$/);
  t.equal(cli(['verify', 'signed/manifest.json', '--rerun', '--key', 'author.pub'], dir).code, 0);

  // A hostile manifest: its protocol names a file outside the folder (signed, even by a pinned key).
  const outside = tempDir({ 'secret.csv': 'not yours\n' });
  const hostile = JSON.parse(readFileSync(join(dir, 'unsigned', 'manifest.json'), 'utf8'));
  for (const [location, file] of [
    [outside, 'secret.csv'],
    ['.', join(outside, 'secret.csv')],
    ['../../..', 'etc/passwd'],
  ]) {
    hostile.protocol.location = location;
    hostile.protocol.document.data.file = file;
    hostile.protocol.sha256 = sha256(canonicalJson(hostile.protocol.document));
    writeFileSync(join(dir, 'unsigned', 'manifest.json'), canonicalJson(hostile) + '\n');
    const r = cli(['verify', 'unsigned/manifest.json', '--rerun', '--allow-unsigned', '--allow-unpinned'], dir);
    t.equal(r.code, 1, `location ${location}, file ${file}`);
    t.match(r.stderr, 'lies outside the folder foldseal may read for this file');
    t.match(r.stderr, 'the re-run would read files outside the review folders, so it was not started');
  }
  // Devices, FIFOs: never read, anywhere.
  spawnSync('mkfifo', [join(dir, 'data', 'fifo.csv')]);
  const fifo = demoText.replace('file: data/seedlings.csv', 'file: data/fifo.csv');
  writeFileSync(join(dir, 'fifo.yaml'), fifo);
  const started = Date.now();
  const v = cli(['validate', 'fifo.yaml'], dir);
  t.equal(v.code, 1);
  t.match(v.stderr, 'file data/fifo.csv is not a regular file (a FIFO); foldseal reads only plain files');
  writeFileSync(join(dir, 'zero.yaml'), demoText.replace('file: data/seedlings.csv', 'file: /dev/zero'));
  const z = cli(['validate', 'zero.yaml', '--allow-outside'], dir);
  t.equal(z.code, 1);
  t.match(z.stderr, 'file /dev/zero is not a regular file (a device)');
  const zOutside = cli(['validate', 'zero.yaml'], dir);
  t.match(zOutside.stderr, 'the data file /dev/zero lies outside');
  const newRows = cli(['validate', 'nr.yaml'], tempDir({ 'nr.yaml': demoText.replace('file: data/seedlings-new.csv', 'file: fifo.csv') }));
  t.equal(newRows.code, 1);
  t.ok(Date.now() - started < 10_000, 'nothing hangs');
});

t.test('verify checks the manifest against itself before any re-run', async (t) => {
  const dir = project();
  t.equal(cli(['run', 'demo.yaml', '--out', 'res'], dir).code, 0);
  const original = readFileSync(join(dir, 'res', 'manifest.json'), 'utf8');
  const cases: [string, (m: any) => void, string][] = [
    [
      'protocol hash',
      (m) => {
        m.protocol.document.description = 'edited';
      },
      'protocol.sha256 is',
    ],
    [
      'assignment',
      (m) => {
        m.split.assignment[0][2] = m.split.assignment[0][2] === 1 ? 2 : 1;
      },
      'split.assignment-sha256 is',
    ],
    [
      'rows',
      (m) => {
        m.data.rows = 119;
      },
      'data.rows is 119, but the assignment holds 120, 120 distinct ids per repeat',
    ],
    [
      'class counts',
      (m) => {
        m.data['class-counts'].yes += 1;
      },
      'do not add up to data.rows (120)',
    ],
    [
      'results',
      (m) => {
        m.results.summary = {};
      },
      'the results embedded in the manifest are not those of results.json next to it',
    ],
  ];
  for (const [name, edit, message] of cases) {
    const m = JSON.parse(original);
    edit(m);
    writeFileSync(join(dir, 'res', 'manifest.json'), canonicalJson(m) + '\n');
    const r = cli(['verify', 'res/manifest.json', '--allow-unpinned', '--rerun', '--allow-unsigned'], dir);
    t.equal(r.code, 1, name);
    t.match(r.stderr, message, name);
    t.match(r.stderr, 'the manifest contradicts itself, so it was not re-run', name);
  }
  writeFileSync(join(dir, 'res', 'manifest.json'), original);
  t.equal(cli(['verify', 'res/manifest.json', '--allow-unpinned'], dir).code, 0);
  const alone = tempDir({ 'manifest.json': original });
  const r = cli(['verify', 'manifest.json', '--allow-unpinned'], alone);
  t.equal(r.code, 1, 'a manifest without any of its result files is not verified');
  t.match(
    r.stderr,
    'none of the 4 result files the manifest lists (applied.csv, models.json, predictions.csv, results.json) is next to it, so there is nothing left to vouch for',
  );
  t.match(r.stdout, /\nnot verified \(results-missing\)\n$/);
});

t.test('a new row under a training id must be that row: else an error at both places', async (t) => {
  const dir = project();
  const data = readFileSync(join(dir, 'data', 'seedlings.csv'), 'utf8').split('\n');
  const news = readFileSync(join(dir, 'data', 'seedlings-new.csv'), 'utf8').split('\n');
  // Same row (all columns but the label): allowed, held out. A different row under the id CS-0002: error.
  const same = data[1].split(',').slice(0, -1).join(',');
  const other = news[2].replace('CS-0122', 'CS-0002');
  const text = [news[0], same, other, ...news.slice(3)].join('\n');
  writeFileSync(join(dir, 'data', 'seedlings-new.csv'), text);
  writeFileSync(
    join(dir, 'demo.yaml'),
    demoText.replace(
      /new-rows: \{file: data\/seedlings-new.csv, sha256: "[0-9a-f]+"\}/,
      `new-rows: {file: data/seedlings-new.csv, sha256: "${sha256(text)}"}`,
    ),
  );
  const r = cli(['validate', 'demo.yaml'], dir);
  t.equal(r.code, 1);
  t.equal(
    r.stderr.split('\n')[0],
    'data/seedlings-new.csv:3:1: error: new row "CS-0002" has the id of a row of the cross-validation (data/seedlings.csv line 3) but different feature values',
  );
  t.notMatch(r.stderr, 'CS-0001', 'the same row under its own id is fine');
  // apply: the saved models know the training rows by content.
  const p2 = project();
  t.equal(cli(['run', 'demo.yaml', '--out', 'res'], p2).code, 0);
  writeFileSync(join(p2, 'later.csv'), [news[0], same, other].join('\n') + '\n');
  const a = cli(['apply', 'res', 'later.csv'], p2);
  t.equal(a.code, 1);
  t.match(
    a.stderr,
    'later.csv:3:1: error: new row "CS-0002" has the id of a row of the cross-validation (in the run of res) but different feature values',
  );
  writeFileSync(join(p2, 'later.csv'), [news[0], same].join('\n') + '\n');
  const ok = cli(['apply', 'res', 'later.csv'], p2);
  t.equal(ok.code, 0, ok.stderr);
  t.match(ok.stdout, /^CS-0001,held-out,/m);
});

t.test("verify's last line agrees with its exit code", async (t) => {
  const dir = project();
  t.equal(cli(['keygen', '--out', 'author'], dir).code, 0);
  t.equal(cli(['run', 'demo.yaml', '--out', 'res', '--key', 'author.key'], dir).code, 0);
  const r = cli(['verify', 'res/manifest.json', '--rerun', '--allow-unsigned'], dir);
  t.equal(r.code, 1, 'the signature is valid but not pinned');
  t.match(r.stdout, /\nnot verified \(signature-unpinned\); the re-run itself was identical\n$/);
  const pinned = cli(['verify', 'res/manifest.json', '--rerun', '--key', 'author.pub'], dir);
  t.equal(pinned.code, 0);
  t.match(pinned.stdout, /\nidentical\n$/);
});
