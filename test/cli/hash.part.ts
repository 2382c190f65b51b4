import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import t from 'tap';
import { cli, root, tempDir } from '../helpers.js';

// Reference: GNU coreutils sha256sum (its output format is the contract of `foldseal hash`).
const haveSha256sum = spawnSync('sha256sum', ['--version']).status === 0;

t.test('hash output is byte-identical to sha256sum', { skip: haveSha256sum ? false : 'sha256sum not installed' }, async (t) => {
  const dir = tempDir({ 'a.csv': 'x,y\n1,2\n', 'with space.txt': 'hello\n', empty: '' });
  const files = ['a.csv', 'with space.txt', 'empty', join(root, 'protocols', 'data', 'seedlings.csv')];
  const ours = await cli(['hash', ...files], dir);
  const theirs = spawnSync('sha256sum', files, { cwd: dir, encoding: 'utf8' });
  t.equal(ours.code, 0);
  t.equal(ours.stdout, theirs.stdout);
});

t.test('hash of a missing file is a located error and exit 2', async (t) => {
  const r = await cli(['hash', 'nope.csv'], tempDir());
  t.equal(r.code, 2);
  t.equal(r.stderr, 'nope.csv: error: file nope.csv does not exist\n');
});

// Reference: FIPS 180-2 appendix B.1 ("abc") — the SHA-256 of the three bytes "abc" (from memory, widely reproduced).
t.test('hash of "abc" is the FIPS 180-2 example digest', async (t) => {
  const dir = tempDir({ abc: 'abc' });
  t.equal((await cli(['hash', 'abc'], dir)).stdout, 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad  abc\n');
});
