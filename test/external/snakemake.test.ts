/**
 * The shipped Snakemake workflow (workflows/Snakefile) run for real by Debian's snakemake with two
 * cores on the demo with a permutation test: the merged folder equals one run byte for byte (apart
 * from the manifest's creation time), and a shard killed midway leaves no part, so the engine
 * simply runs it again.
 */
import { spawn, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { bin, cli, root, tempDir } from '../helpers.js';

const have = spawnSync('snakemake', ['--version'], { encoding: 'utf8' });
const skip = have.status === 0 ? false : 'snakemake is not installed (apt-get install snakemake)';

t.test('the workflow runs the shards and merges them into the single run’s files', { skip, timeout: 180_000 }, async (t) => {
  const dir = tempDir();
  cpSync(join(root, 'protocols'), join(dir, 'protocols'), { recursive: true });
  cpSync(join(root, 'workflows'), join(dir, 'workflows'), { recursive: true });
  // The statistics demo with 39 permutations instead of 1,000 (the suite's time budget): 49 work units.
  const protocol = 'protocols/demo-logistic-short.yaml';
  const text = readFileSync(join(root, 'protocols', 'demo-logistic.yaml'), 'utf8');
  t.match(text, 'count: 1000');
  writeFileSync(join(dir, protocol), text.replace('count: 1000', 'count: 39'));
  const single = await cli(['run', protocol, '--out', 'results/single'], dir);
  t.equal(single.code, 0, single.stderr);

  // A shard killed midway: its part is written under a temporary name and renamed only when complete.
  mkdirSync(join(dir, 'results', 'sharded.parts'), { recursive: true });
  const part = join(dir, 'results', 'sharded.parts', 'part-1-of-3.json');
  const child = spawn(process.execPath, [bin, 'run', protocol, '--shard', '1/3', '--out', part], { cwd: dir, stdio: 'ignore' });
  await new Promise((r) => setTimeout(r, 150));
  child.kill('SIGKILL');
  await new Promise((r) => child.on('exit', r));
  t.notOk(existsSync(part), 'the killed shard left no part');

  const r = spawnSync(
    'snakemake',
    [
      '--snakefile',
      'workflows/Snakefile',
      '--cores',
      '2',
      '--config',
      `protocol=${protocol}`,
      'shards=3',
      'out=results/sharded',
      `foldseal=${process.execPath} ${bin}`,
    ],
    { cwd: dir, encoding: 'utf8', timeout: 170_000 },
  );
  t.equal(r.status, 0, r.stderr.slice(-2000));
  t.same(
    readdirSync(join(dir, 'results', 'sharded.parts'))
      .filter((f) => f.endsWith('.json'))
      .sort(),
    ['part-1-of-3.json', 'part-2-of-3.json', 'part-3-of-3.json'],
  );
  for (const f of ['predictions.csv', 'results.json', 'models.json', 'applied.csv'])
    t.ok(readFileSync(join(dir, 'results', 'sharded', f)).equals(readFileSync(join(dir, 'results', 'single', f))), `${f} byte-identical`);
  const manifest = (d: string) => readFileSync(join(dir, 'results', d, 'manifest.json'), 'utf8').replace(/"created":"[^"]*"/, '');
  t.equal(manifest('sharded'), manifest('single'), 'manifest identical apart from its creation time');
});
