/**
 * Sharded runs: every unit in exactly one shard; a part's numbers round-trip bit for bit (property
 * test); merging shards gives the files one run writes, byte for byte; bad parts are refused by name.
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import t from 'tap';
import {
  decodePart,
  encodePart,
  parseShard,
  SHARD_VERSION,
  unitName,
  unitsOfShard,
  workUnits,
  type ShardPart,
} from '../../src/run/shards.js';
import { cli, referenceTable, sha256, tempDir } from '../helpers.js';

t.test('shards deal every unit exactly once', async (t) => {
  fc.assert(
    fc.property(
      fc.integer({ min: 1, max: 12 }),
      fc.integer({ min: 1, max: 3 }),
      fc.integer({ min: 0, max: 40 }),
      fc.integer({ min: 1, max: 9 }),
      (folds, repeats, perms, n) => {
        const plans = Array.from({ length: folds * repeats }, (_, i) => ({ repeat: Math.floor(i / folds) + 1, fold: (i % folds) + 1 }));
        const units = workUnits(plans, perms);
        const dealt = Array.from({ length: n }, (_, i) => unitsOfShard(units, i + 1, n))
          .flat()
          .map(unitName)
          .sort();
        return dealt.length === units.length && new Set(dealt).size === units.length;
      },
    ),
  );
  t.same(parseShard('2/8'), { index: 2, count: 8 });
  for (const bad of ['0/3', '4/3', '1', 'a/b', '1/0', '-1/2']) t.equal(parseShard(bad), undefined, bad);
});

t.test('a part round-trips every double, NaN, ±Infinity and typed array exactly', async (t) => {
  fc.assert(
    fc.property(fc.array(fc.double()), fc.array(fc.integer({ min: -(2 ** 31), max: 2 ** 31 - 1 })), (xs, is) => {
      const part: ShardPart = {
        'foldseal-shard': SHARD_VERSION,
        'protocol-sha256': 'p',
        'data-sha256': 'd',
        'assignment-sha256': 'a',
        tool: 'foldseal test',
        shard: { index: 1, count: 1 },
        units: ['fold 1/1'],
        fits: [
          {
            unit: 'fold 1/1',
            pipeline: { params: Float64Array.from(xs) },
            model: { w: xs, k: Int32Array.from(is) },
            proba: Float64Array.from(xs),
          },
        ],
        permutations: [{ unit: 'permutation 1', score: xs[0] ?? null }],
      };
      const back = decodePart(encodePart(part));
      const same = (a: ArrayLike<number>, b: ArrayLike<number>) =>
        a.length === b.length && Array.from(a).every((v, i) => Object.is(v, b[i]));
      const fit = back.fits[0] as any;
      return (
        fit.proba instanceof Float64Array &&
        same(
          fit.proba,
          xs.map((x) => (Object.is(x, -0) ? -0 : x)),
        ) &&
        same(fit.pipeline.params, xs) &&
        fit.model.k instanceof Int32Array &&
        same(fit.model.k, is) &&
        same(fit.model.w, xs)
      );
    }),
  );
  t.pass('the property held for every generated part');
});

const bc = referenceTable('breast-cancer.csv');
const protocol = [
  'foldseal: 1',
  'name: bc-shards',
  'data:',
  '  file: data.csv',
  `  sha256: "${sha256(bc.csv)}"`,
  '  id: id',
  '  label: diagnosis',
  'split: {rule: stratified-kfold, folds: 4, repeats: 2, seed: 3}',
  'preprocess: [standardize, {select: {top: 6, by: t-test}}]',
  'model: {kind: logistic}',
  'reconcile: {rule: refit}',
  'metrics: [roc-auc, accuracy]',
  'statistics:',
  '  bootstrap: {replicates: 100, seed: 1}',
  '  permutation: {count: 9, seed: 2, metric: roc-auc}',
].join('\n');

t.test('merged shards are byte-identical to one run; bad parts are refused and nothing is written', async (t) => {
  const dir = tempDir({ 'data.csv': bc.csv, 'p.yaml': protocol, 'q.yaml': protocol.replace('seed: 3', 'seed: 4') });
  t.equal((await cli(['run', 'p.yaml', '--out', 'single'], dir)).code, 0);
  mkdirSync(join(dir, 'parts'));
  for (let i = 1; i <= 3; i++) {
    const r = await cli(['run', 'p.yaml', '--shard', `${i}/3`, '--out', `parts/${i}.json`], dir);
    t.equal(r.code, 0, r.stderr);
    t.match(r.stdout, new RegExp(`shard ${i}/3: \\d+ work units`));
  }
  const merged = await cli(['merge', 'p.yaml', 'parts/3.json', 'parts/1.json', 'parts/2.json', '--out', 'merged'], dir);
  t.equal(merged.code, 0, merged.stderr);
  for (const f of ['predictions.csv', 'results.json', 'models.json'])
    t.ok(readFileSync(join(dir, 'merged', f)).equals(readFileSync(join(dir, 'single', f))), `${f} byte-identical`);
  const manifest = (d: string) => readFileSync(join(dir, d, 'manifest.json'), 'utf8').replace(/"created":"[^"]*"/, '');
  t.equal(manifest('merged'), manifest('single'), 'manifest identical apart from its creation time');

  const refused = async (args: string[], pattern: RegExp) => {
    const r = await cli(['merge', 'p.yaml', ...args, '--out', 'bad'], dir);
    t.equal(r.code, 1, args.join(' '));
    t.match(r.stderr, pattern);
    t.match(r.stderr, 'merge refused: nothing was written');
  };
  await refused(['parts/1.json', 'parts/2.json'], /work units are in no part \(.*\n\s+hint: run the shard 3\/3 and merge again/);
  await refused(
    ['parts/1.json', 'parts/2.json', 'parts/3.json', 'parts/2.json'],
    /parts\/2\.json repeats \d+ work units of itself \(given twice\)/,
  );
  t.equal((await cli(['run', 'q.yaml', '--shard', '2/3', '--out', 'parts/q2.json'], dir)).code, 0);
  await refused(
    ['parts/1.json', 'parts/q2.json', 'parts/3.json'],
    /parts\/q2\.json belongs to another run: its protocol and fold assignment differ/,
  );
  writeFileSync(join(dir, 'parts', 'junk.json'), '{"half": ');
  await refused(['parts/1.json', 'parts/junk.json'], /parts\/junk\.json is not a shard part \(not JSON/);
  writeFileSync(join(dir, 'parts', 'other.json'), '{"foldseal-shard": 7}');
  await refused(
    ['parts/1.json', 'parts/other.json', 'parts/2.json', 'parts/3.json'],
    /other\.json is not a foldseal shard part \(format 7\)/,
  );
  const missing = await cli(['merge', 'p.yaml', 'parts/9.json', '--out', 'bad'], dir);
  t.equal(missing.code, 1);
  t.match(missing.stderr, 'parts/9.json');
  const usage = await cli(['run', 'p.yaml', '--shard', '4/3'], dir);
  t.equal(usage.code, 2);
  t.match(usage.stderr, '--shard must be I/N with 1 ≤ I ≤ N');
  t.equal((await cli(['run', 'p.yaml', '--shard', '1/3', '--key', 'k.key'], dir)).code, 2, '--key belongs to merge');
});
