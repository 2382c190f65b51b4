/** Folds fitted on worker threads give byte-identical results to the serial loop. */
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { bin, root, tempDir } from '../helpers.js';

const run = (threads: string, args: string[], cwd: string) => spawnSync(process.execPath, [bin, ...args], { cwd, encoding: 'utf8', env: { ...process.env, FOLDSEAL_THREADS: threads } });

t.test('FOLDSEAL_THREADS=3 and =1 write identical files', async (t) => {
  const dir = tempDir();
  for (const threads of ['1', '3']) {
    const r = run(threads, ['run', join(root, 'protocols', 'demo.yaml'), '--out', `res-${threads}`], dir);
    t.equal(r.status, 0, r.stderr);
  }
  for (const f of ['predictions.csv', 'results.json', 'models.json', 'applied.csv']) {
    t.equal(readFileSync(join(dir, 'res-3', f), 'utf8'), readFileSync(join(dir, 'res-1', f), 'utf8'), f);
  }
});

t.test('a fit error inside a worker is the same user error', async (t) => {
  const dir = tempDir();
  const demo = readFileSync(join(root, 'protocols', 'demo.yaml'), 'utf8').replaceAll('file: data/', `file: ${join(root, 'protocols', 'data')}/`).replace('model: {kind: gaussian-nb}', 'model: {kind: multinomial-nb}');
  writeFileSync(join(dir, 'p.yaml'), demo);
  const r = run('2', ['run', 'p.yaml', '--out', 'res'], dir);
  t.equal(r.status, 1, r.stderr);
  t.match(r.stderr, 'error: multinomial-nb needs non-negative counts');
});
