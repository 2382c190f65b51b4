/** The repository gate on temporary team repositories: each finding kind with its exact line. */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { cli, sha256, smallCsv, tempDir } from '../helpers.js';

const csv = smallCsv(20);
const protocol = (name: string, seed = 7, extra = '', data = 'a.csv', dataText = csv) =>
  [
    'foldseal: 1',
    `name: ${name}`,
    'data:',
    `  file: ../data/${data}`,
    `  sha256: "${sha256(dataText)}"`,
    '  id: id',
    '  label: label',
    '  features: [a, b, c]',
    'split:',
    '  rule: stratified-kfold',
    '  folds: 2',
    `  seed: ${seed}`,
    'model: {kind: gaussian-nb}',
    extra,
  ].join('\n') + '\n';

async function team(files: Record<string, string> = {}): Promise<string> {
  const dir = tempDir({
    'data/a.csv': csv,
    'protocols/p1.yaml': protocol('first'),
    'protocols/p2.yaml': protocol('second', 11),
    'README.md': 'not a protocol',
    'notes.yaml': 'title: not a protocol\n',
    ...files,
  });
  const locked = await cli(['lock', dir]);
  if (locked.code !== 0) throw new Error(locked.stderr);
  return dir;
}
const lines = (s: string) => s.trimEnd().split('\n');

t.test('a clean repository passes; lock prints what it recorded', async (t) => {
  const dir = tempDir({ 'data/a.csv': csv, 'protocols/p1.yaml': protocol('first') });
  const first = await cli(['lock', dir]);
  t.equal(first.stdout, '+ protocols/p1.yaml (first): added\n');
  const r = await cli(['check', dir]);
  t.equal(r.code, 0, r.stderr);
  t.equal(r.stderr, '1 protocol checked: 0 errors, 0 warnings\n');
  t.equal((await cli(['lock', dir])).stdout, 'no changes\n');
});

t.test('no lock at all is a warning', async (t) => {
  const dir = tempDir({ 'data/a.csv': csv, 'protocols/p1.yaml': protocol('first') });
  const r = await cli(['check', dir], dir);
  t.equal(r.code, 0);
  t.equal(lines(r.stderr)[0], 'foldseal.lock.json: warning: there is no foldseal.lock.json, so splits are not pinned');
});

t.test('seed change without a lock update, then accepted with lock', async (t) => {
  const dir = await team();
  writeFileSync(join(dir, 'protocols/p1.yaml'), protocol('first', 8));
  const r = await cli(['check', '.'], dir);
  t.equal(r.code, 1);
  t.ok(lines(r.stderr).includes('protocols/p1.yaml:12:9: error: the seed changed from 7 to 8 without a lock update'), r.stderr);
  t.match(r.stderr, /protocols\/p1\.yaml:10:3: error: split drift in first: \d+ ids moved to another fold \(r\d+/);
  t.match(r.stderr, '2 protocols checked: 2 errors, 0 warnings');
  const lock = await cli(['lock', '.'], dir);
  t.match(lock.stdout, /^~ protocols\/p1\.yaml: seed 7 → 8, \d+ ids moved$/m);
  t.equal((await cli(['check', '.'], dir)).code, 0);
});

t.test('rule change, data drift and split drift', async (t) => {
  const dir = await team();
  const changed = csv.replace('r3,x,G3,3,', 'r3,x,G3,4,');
  writeFileSync(
    join(dir, 'protocols/p1.yaml'),
    protocol('first', 7, '', 'a.csv', changed).replace('rule: stratified-kfold', 'rule: kfold'),
  );
  writeFileSync(join(dir, 'data/a.csv'), changed);
  writeFileSync(join(dir, 'protocols/p2.yaml'), protocol('second', 11, '', 'a.csv', changed));
  const r = await cli(['check', '.'], dir);
  t.equal(r.code, 1);
  const out = lines(r.stderr);
  t.ok(out.includes('protocols/p1.yaml:10:9: error: the split changed from stratified-kfold to kfold without a lock update'), r.stderr);
  t.ok(out.includes(`protocols/p1.yaml:5:11: error: the data changed: SHA-256 ${sha256(changed)}, locked ${sha256(csv)}`), r.stderr);
  t.match(r.stderr, /^protocols\/p1\.yaml:10:3: error: split drift in first: \d+ ids moved/m);
  t.ok(out.includes(`protocols/p2.yaml:5:11: error: the data changed: SHA-256 ${sha256(changed)}, locked ${sha256(csv)}`), r.stderr);
});

t.test('a changed fold count is split drift naming the ids that moved', async (t) => {
  const dir = await team();
  writeFileSync(join(dir, 'protocols/p2.yaml'), protocol('second', 11).replace('folds: 2', 'folds: 4'));
  const r = await cli(['check', '.'], dir);
  t.match(r.stderr, /^protocols\/p2\.yaml:10:3: error: split drift in second: \d+ ids moved to another fold \((r\d+, ){4}r\d+, …\)$/m);
});

t.test('another change to a protocol', async (t) => {
  const dir = await team();
  writeFileSync(join(dir, 'protocols/p2.yaml'), protocol('second', 11, 'description: now with a description'));
  const r = await cli(['check', '.'], dir);
  t.ok(lines(r.stderr).includes('protocols/p2.yaml:2:7: error: protocols/p2.yaml changed since it was locked'), r.stderr);
});

t.test('a lock naming a protocol that no longer exists, and an unlisted protocol', async (t) => {
  const dir = await team();
  rmSync(join(dir, 'protocols/p2.yaml'));
  writeFileSync(join(dir, 'protocols/p3.yaml'), protocol('third'));
  const r = await cli(['check', '.'], dir);
  t.equal(r.code, 1);
  const out = lines(r.stderr);
  t.ok(
    out.some((l) => /^foldseal\.lock\.json:\d+:5: error: the lock names protocols\/p2\.yaml, which no longer exists$/.test(l)),
    r.stderr,
  );
  t.ok(out.includes('protocols/p3.yaml:2:7: error: protocols/p3.yaml is not in the lock'), r.stderr);
});

t.test('two protocols with the same name, and one that cannot be read', async (t) => {
  const dir = await team();
  writeFileSync(join(dir, 'protocols/broken.yaml'), 'foldseal: 1\nname: [oops\n');
  writeFileSync(join(dir, 'protocols/p3.yaml'), protocol('first'));
  const r = await cli(['check', '.'], dir);
  const out = lines(r.stderr);
  t.ok(out.includes('protocols/p3.yaml:2:7: error: protocol name "first" is also used by protocols/p1.yaml'), r.stderr);
  t.ok(
    out.some((l) => l.startsWith('protocols/broken.yaml:3:1: error: ')),
    r.stderr,
  );
});

t.test('a corrupt lock is exit 2 with its location', async (t) => {
  const dir = await team();
  writeFileSync(join(dir, 'foldseal.lock.json'), '{\n  "foldseal-lock": 1,\n  "protocols": {\n');
  const r = await cli(['check', '.'], dir);
  t.equal(r.code, 2);
  t.match(r.stderr, /^foldseal\.lock\.json:\d+:\d+: error: the lock is not valid JSON: /m);
  writeFileSync(join(dir, 'foldseal.lock.json'), '{"foldseal-lock": 9, "protocols": {}}');
  t.match((await cli(['check', '.'], dir)).stderr, 'foldseal.lock.json:1:1: error: lock format 9 is not one this foldseal reads (1)');
});

t.test('symlink loops do not hang the search; dot-folders and node_modules are skipped', async (t) => {
  const dir = await team({ 'node_modules/x/p.yaml': protocol('hidden'), '.cache/p.yaml': protocol('hidden2') });
  mkdirSync(join(dir, 'loop'));
  symlinkSync(join(dir, 'loop'), join(dir, 'loop', 'again'));
  symlinkSync(dir, join(dir, 'protocols', 'up'));
  const r = await cli(['check', '.'], dir);
  t.equal(r.code, 0, r.stderr);
  t.match(r.stderr, '2 protocols checked');
});

t.test('sealed rows: used by a non-final protocol, and a final protocol that tests on them', async (t) => {
  const sealedIds = 'id\nr1\nr2\nr3\nr4\n';
  const pinned =
    'id,repeat,fold\n' +
    Array.from({ length: 20 }, (_, i) => `r${i + 1},1,${i < 4 ? 1 : 2}`)
      .sort()
      .join('\n') +
    '\n';
  const finalProtocol = protocol('final-eval').replace(
    /split:\n[\s\S]*?model:/,
    `final: true\nsplit:\n  pinned: {file: ../splits/final.csv, sha256: "${sha256(pinned)}"}\nmodel:`,
  );
  const dir = await team({ 'splits/final.ids': sealedIds, 'splits/final.csv': pinned, 'protocols/final.yaml': finalProtocol });
  const lockPath = join(dir, 'foldseal.lock.json');
  const lock = JSON.parse(readFileSync(lockPath, 'utf8'));
  lock.sealed = { file: 'splits/final.ids', sha256: sha256(sealedIds) };
  writeFileSync(lockPath, JSON.stringify(lock, null, 2));
  const r = await cli(['check', '.'], dir);
  t.equal(r.code, 1);
  const out = lines(r.stderr);
  t.ok(
    out.includes(
      'protocols/p1.yaml:4:9: error: first uses 4 sealed ids from ../data/a.csv (reserved for the final evaluation): r1, r2, r3, r4',
    ),
    r.stderr,
  );
  t.ok(
    out.includes(
      'protocols/p2.yaml:4:9: error: second uses 4 sealed ids from ../data/a.csv (reserved for the final evaluation): r1, r2, r3, r4',
    ),
  );
  t.notOk(
    out.some((l) => l.startsWith('protocols/final.yaml')),
    'the final protocol tests on exactly the sealed ids',
  );
  const finalRun = await cli(['run', 'protocols/final.yaml', '--out', 'results/final'], dir);
  t.equal(finalRun.code, 0, finalRun.stderr);
  const results = JSON.parse(readFileSync(join(dir, 'results/final/results.json'), 'utf8'));
  t.same(
    results.folds.map((f: { fold: number; 'test-rows': number; 'train-rows': number }) => [f.fold, f['test-rows'], f['train-rows']]),
    [[1, 4, 16]],
    'a final protocol tests fold 1 only and never trains on the sealed rows',
  );
  writeFileSync(join(dir, 'splits/final.ids'), 'r1\nr2\nr3\nr5\n');
  const moved = await cli(['check', '.'], dir);
  t.match(
    moved.stderr,
    /^foldseal\.lock\.json: error: the sealed-ids file splits\/final\.ids has SHA-256 \w{64}, not the \w{64} the lock records$/m,
  );
  t.ok(
    lines(moved.stderr).includes(
      'protocols/final.yaml:11:3: error: the test part (fold 1) of final protocol final-eval must be exactly the sealed ids: 1 ' +
        'sealed ids are not in it, 1 other ids are',
    ),
    moved.stderr,
  );
});

t.test('policy: pinned-or-stable, tolerance and signers', async (t) => {
  const dir = await team({ 'protocols/p3.yaml': protocol('third', 5, 'verify: {tolerance: 0.001}') });
  const lockPath = join(dir, 'foldseal.lock.json');
  const lock = JSON.parse(readFileSync(lockPath, 'utf8'));
  lock.policy = { 'require-pinned-or-stable': true, 'forbid-tolerance': true, signers: ['0'.repeat(64)] };
  writeFileSync(lockPath, JSON.stringify(lock, null, 2));
  await cli(['run', 'protocols/p1.yaml', '--out', 'results/first'], dir);
  const r = await cli(['check', '.', '--format', 'json'], dir);
  t.equal(r.code, 1);
  const codes = (JSON.parse(r.stdout) as { code: string; file: string; line: number | null }[]).map((f) => `${f.code}@${f.file}:${f.line}`);
  t.ok(codes.includes('policy-unpinned@protocols/p1.yaml:10'), codes.join(' '));
  t.ok(codes.includes('policy-tolerance@protocols/p3.yaml:14'), codes.join(' '));
  t.ok(codes.includes('policy-unsigned@results/first/manifest.json:null'), codes.join(' '));
});

t.test('--staged checks only the touched protocols and those sharing their data', async (t) => {
  const other =
    'id,label,a,b,c\n' + Array.from({ length: 10 }, (_, i) => `o${i},${i % 2 ? 'x' : 'y'},${i},${i * 2},${i % 3}`).join('\n') + '\n';
  const dir = await team({ 'data/b.csv': other, 'protocols/p4.yaml': protocol('fourth', 3, '', 'b.csv', other) });
  const git = (...args: string[]) => execFileSync('git', args, { cwd: dir, encoding: 'utf8' });
  git('init', '-q');
  git('-c', 'user.email=t@example.org', '-c', 'user.name=t', 'add', '.');
  git('-c', 'user.email=t@example.org', '-c', 'user.name=t', 'commit', '-qm', 'start');
  writeFileSync(join(dir, 'protocols/p1.yaml'), protocol('first', 9));
  writeFileSync(join(dir, 'protocols/p4.yaml'), protocol('fourth', 4, '', 'b.csv', other));
  git('add', 'protocols/p1.yaml');
  const r = await cli(['check', '--staged'], dir);
  t.equal(r.code, 1);
  t.match(r.stderr, 'protocols/p1.yaml:12:9: error: the seed changed from 7 to 9 without a lock update');
  t.notMatch(r.stderr, 'p4.yaml', 'an unstaged change to a protocol on other data is left to the full check');
  t.match(r.stderr, '2 protocols checked', 'p1 and p2, which shares its data');
  t.match((await cli(['check'], dir)).stderr, 'protocols/p4.yaml:12:9: error: the seed changed from 3 to 4');
  t.equal((await cli(['check', '--staged'], tempDir())).code, 2, 'outside git');
});

t.test("--staged runs no program the repository's config names (core.fsmonitor, an external diff)", async (t) => {
  const dir = await team();
  const git = (...args: string[]) => execFileSync('git', args, { cwd: dir, encoding: 'utf8' });
  git('init', '-q');
  git('-c', 'user.email=t@example.org', '-c', 'user.name=t', 'add', '.');
  git('-c', 'user.email=t@example.org', '-c', 'user.name=t', 'commit', '-qm', 'start');
  const marker = join(dir, 'RAN');
  writeFileSync(join(dir, 'hook.sh'), `#!/bin/sh\ntouch '${marker}'\n`, { mode: 0o755 });
  writeFileSync(join(dir, 'protocols/p1.yaml'), protocol('first', 9));
  git('add', 'protocols/p1.yaml');
  git('config', 'core.fsmonitor', join(dir, 'hook.sh'));
  git('config', 'diff.external', join(dir, 'hook.sh'));
  const r = await cli(['check', '--staged'], dir);
  t.equal(r.code, 1, r.stderr);
  t.notOk(existsSync(marker), 'the configured program did not run');
});
