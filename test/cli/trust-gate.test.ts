/**
 * Trust, part 2: the gate, sealed rows, re-runs of untrusted manifests, devices, manifests
 * checked against themselves, new rows under training ids — each attack reproduced on a
 * temporary folder and shown to fail.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { canonicalJson } from '../../src/manifest/canonical.js';
import { cli, sha256, tempDir } from '../helpers.js';
import { csv, demoText, project, protocolFor } from './trust-fixtures.js';

t.test('the gate finds protocols by parsing, however the key is spelled', async (t) => {
  const data = { 'data/data.csv': csv };
  const body = protocolFor('x', '../data/data.csv').split('\n').slice(1).join('\n');
  const variants: Record<string, string> = {
    'protocols/bom.yaml': '\ufeff' + protocolFor('bom', '../data/data.csv'),
    'protocols/quoted.yaml': `"foldseal": 1\n${body.replace('name: x', 'name: quoted')}`,
    'protocols/escaped.yaml': `"\\x66oldseal": 1\n${body.replace('name: x', 'name: escaped')}`,
    'protocols/explicit.yml': `? foldseal\n: 1\n${body.replace('name: x', 'name: explicit')}`,
    'protocols/flow.yaml':
      `{foldseal: 1, name: flow, data: {file: ../data/data.csv, sha256: "${sha256(csv)}", id: id, label: ` +
      `label}, split: {rule: kfold, folds: 2, seed: 1}, model: {kind: gaussian-nb}}\n`,
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
    t.equal((await cli(['validate', path], dir)).code, 0, `run would accept ${path}`);
  }
  const r = await cli(['check', '.'], dir);
  t.match(r.stderr, '6 protocols checked', r.stderr);
  const bad = await cli(['run', 'p.txt'], tempDir({ 'p.txt': protocolFor('txt') }));
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
  const first = await cli(['check', '.'], dir);
  t.match(
    first.stderr,
    "2 protocols checked: 0 errors, 1 warning; not searched: .hidden, node_modules (add folders to the lock's policy.include to " +
      'search them)',
  );
  t.equal((await cli(['lock', '.'], dir)).code, 0);
  const lockPath = join(dir, 'foldseal.lock.json');
  const lock = JSON.parse(readFileSync(lockPath, 'utf8'));
  lock.policy = { skip: ['scratch'], include: ['.hidden'] };
  writeFileSync(lockPath, JSON.stringify(lock));
  const r = await cli(['check', '.'], dir);
  t.match(r.stderr, '2 protocols checked', r.stderr);
  t.match(r.stderr, 'not searched: node_modules, scratch');
  t.match(r.stderr, '.hidden/two.yaml');
  t.match(r.stderr, '.hidden/two.yaml is not in the lock');
  const run = await cli(['run', 'scratch/three.yaml', '--out', 'res'], dir);
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
  const finalP =
    `foldseal: 1\nname: final\nfinal: true\ndata: {file: data/data.csv, sha256: "${sha256(csv)}", id: id, label: ` +
    `label, features: [a, b, c]}\nsplit: {pinned: {file: splits/final.csv, sha256: "${sha256(pinned)}"}}\npreprocess: ` +
    `[standardize]\nmodel: {kind: gaussian-nb}\n`;
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
  const lock = await cli(['lock', '.'], dir);
  t.equal(lock.code, 0, lock.stderr);
  t.match(lock.stdout, 'sealed rows: 4 content digests recorded');
  t.equal(JSON.parse(readFileSync(join(dir, 'foldseal.lock.json'), 'utf8')).sealed.rows.length, 4);
  const r = await cli(['check', '.'], dir);
  t.equal(r.code, 1);
  t.match(
    r.stderr,
    'dev.yaml:3:14: error: dev has 4 rows in data/dev.csv with the same label and feature values as sealed rows, under other ids: ' +
      'copy1, copy2, copy3, copy4',
  );
  // The final data is gone: the digests in the lock still catch the copy.
  writeFileSync(join(dir, 'final.yaml'), finalP.replace('final: true\n', 'final: true\ndescription: moved\n'));
  const dev = await cli(['run', 'dev.yaml', '--out', 'res-dev'], dir);
  t.equal(dev.code, 1, 'run refuses to test on sealed rows in a locked repository');
  t.match(dev.stderr, 'same label and feature values as sealed rows');
  t.notOk(existsSync(join(dir, 'res-dev')));
  const refit = await cli(['run', 'final.yaml', '--out', 'res-final', '--refit'], dir);
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
  t.equal((await cli(['keygen', '--out', 'author'], dir)).code, 0);
  t.equal((await cli(['run', 'demo.yaml', '--out', 'signed', '--key', 'author.key'], dir)).code, 0);
  t.equal((await cli(['run', 'demo.yaml', '--out', 'unsigned'], dir)).code, 0);
  const unpinned = await cli(['verify', 'signed/manifest.json', '--rerun', '--allow-unpinned'], dir);
  t.equal(unpinned.code, 1);
  t.match(unpinned.stderr, 'error: the manifest is not signed by a pinned key, so its protocol was not re-run');
  t.notMatch(unpinned.stdout, 'rerun:');
  const unsigned = await cli(['verify', 'unsigned/manifest.json', '--rerun'], dir);
  t.equal(unsigned.code, 1);
  t.match(unsigned.stderr, 'the manifest is not validly signed, so its protocol was not re-run');
  const allowed = await cli(['verify', 'unsigned/manifest.json', '--rerun', '--allow-unsigned', '--allow-unpinned'], dir);
  t.equal(allowed.code, 0, allowed.stderr);
  t.match(allowed.stdout, /identical\n$/);
  t.equal((await cli(['verify', 'signed/manifest.json', '--rerun', '--key', 'author.pub'], dir)).code, 0);

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
    const r = await cli(['verify', 'unsigned/manifest.json', '--rerun', '--allow-unsigned', '--allow-unpinned'], dir);
    t.equal(r.code, 1, `location ${location}, file ${file}`);
    t.match(r.stderr, 'lies outside the folder foldseal may read for this file');
    t.match(r.stderr, 'the re-run would read files outside the review folders, so it was not started');
  }
  // Devices, FIFOs: never read, anywhere.
  spawnSync('mkfifo', [join(dir, 'data', 'fifo.csv')]);
  const fifo = demoText.replace('file: data/seedlings.csv', 'file: data/fifo.csv');
  writeFileSync(join(dir, 'fifo.yaml'), fifo);
  const started = Date.now();
  const v = await cli(['validate', 'fifo.yaml'], dir);
  t.equal(v.code, 1);
  t.match(v.stderr, 'file data/fifo.csv is not a regular file (a FIFO); foldseal reads only plain files');
  writeFileSync(join(dir, 'zero.yaml'), demoText.replace('file: data/seedlings.csv', 'file: /dev/zero'));
  const z = await cli(['validate', 'zero.yaml', '--allow-outside'], dir);
  t.equal(z.code, 1);
  t.match(z.stderr, 'file /dev/zero is not a regular file (a device)');
  const zOutside = await cli(['validate', 'zero.yaml'], dir);
  t.match(zOutside.stderr, 'the data file /dev/zero lies outside');
  const newRows = await cli(
    ['validate', 'nr.yaml'],
    tempDir({ 'nr.yaml': demoText.replace('file: data/seedlings-new.csv', 'file: fifo.csv') }),
  );
  t.equal(newRows.code, 1);
  t.ok(Date.now() - started < 10_000, 'nothing hangs');
});

t.test('verify checks the manifest against itself before any re-run', async (t) => {
  const dir = project();
  t.equal((await cli(['run', 'demo.yaml', '--out', 'res'], dir)).code, 0);
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
    const r = await cli(['verify', 'res/manifest.json', '--allow-unpinned', '--rerun', '--allow-unsigned'], dir);
    t.equal(r.code, 1, name);
    t.match(r.stderr, message, name);
    t.match(r.stderr, 'the manifest contradicts itself, so it was not re-run', name);
  }
  writeFileSync(join(dir, 'res', 'manifest.json'), original);
  t.equal((await cli(['verify', 'res/manifest.json', '--allow-unpinned'], dir)).code, 0);
  const alone = tempDir({ 'manifest.json': original });
  const r = await cli(['verify', 'manifest.json', '--allow-unpinned'], alone);
  t.equal(r.code, 1, 'a manifest without any of its result files is not verified');
  t.match(
    r.stderr,
    'none of the 4 result files the manifest lists (applied.csv, models.json, predictions.csv, results.json) is next to it, so ' +
      'there is nothing left to vouch for',
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
  const r = await cli(['validate', 'demo.yaml'], dir);
  t.equal(r.code, 1);
  t.equal(
    r.stderr.split('\n')[0],
    'data/seedlings-new.csv:3:1: error: new row "CS-0002" has the id of a row of the cross-validation (data/seedlings.csv line 3) ' +
      'but different feature values',
  );
  t.notMatch(r.stderr, 'CS-0001', 'the same row under its own id is fine');
  // apply: the saved models know the training rows by content.
  const p2 = project();
  t.equal((await cli(['run', 'demo.yaml', '--out', 'res'], p2)).code, 0);
  writeFileSync(join(p2, 'later.csv'), [news[0], same, other].join('\n') + '\n');
  const a = await cli(['apply', 'res', 'later.csv'], p2);
  t.equal(a.code, 1);
  t.match(
    a.stderr,
    'later.csv:3:1: error: new row "CS-0002" has the id of a row of the cross-validation (in the run of res) but different feature values',
  );
  writeFileSync(join(p2, 'later.csv'), [news[0], same].join('\n') + '\n');
  const ok = await cli(['apply', 'res', 'later.csv'], p2);
  t.equal(ok.code, 0, ok.stderr);
  t.match(ok.stdout, /^CS-0001,held-out,/m);
});

t.test("verify's last line agrees with its exit code", async (t) => {
  const dir = project();
  t.equal((await cli(['keygen', '--out', 'author'], dir)).code, 0);
  t.equal((await cli(['run', 'demo.yaml', '--out', 'res', '--key', 'author.key'], dir)).code, 0);
  const r = await cli(['verify', 'res/manifest.json', '--rerun', '--allow-unsigned'], dir);
  t.equal(r.code, 1, 'the signature is valid but not pinned');
  t.match(r.stdout, /\nnot verified \(signature-unpinned\); the re-run itself was identical\n$/);
  const pinned = await cli(['verify', 'res/manifest.json', '--rerun', '--key', 'author.pub'], dir);
  t.equal(pinned.code, 0);
  t.match(pinned.stdout, /\nidentical\n$/);
});
