// compareRuns on hand-made manifests (common practice: a small example per kind of difference).
import t from 'tap';
import { compareRuns, verdict } from '../../src/manifest/compare.js';

const manifest = (version: string, accuracy: number, predictions = 'p1') => ({
  tool: { name: 'foldseal', version, node: 'v20', platform: 'linux' },
  protocol: { sha256: 'a' },
  data: { sha256: 'b' },
  split: {
    assignment: [
      ['x', 1, 1],
      ['y', 1, 2],
    ],
  },
  results: {
    folds: [{ repeat: 1, fold: 1, metrics: { accuracy } }],
    summary: { accuracy: { mean: accuracy, sd: null, pooled: accuracy } },
  },
  files: { 'predictions.csv': predictions },
});

t.test('a re-run with another foldseal version names the version when fitted values differ', async (t) => {
  const same = compareRuns(manifest('0.1.0', 0.75), manifest('0.2.0', 0.75), 0);
  t.same(same, [], 'identical results: the version alone is no difference');
  const moved = compareRuns(manifest('0.1.0', 0.75), manifest('0.2.0', 0.7500000000000001, 'p2'), 0);
  t.same(
    moved.map((d) => d.kind),
    ['metric', 'metric', 'metric', 'predictions', 'tool'],
  );
  t.match(moved.at(-1)!.message, 'recorded with foldseal 0.1.0, re-run with 0.2.0');
  t.equal(verdict(moved), 'differs: metrics (3 values), predictions, foldseal version');
  t.same(compareRuns(manifest('0.1.0', 0.75), manifest('0.2.0', 0.7500000000000001), 1e-9), [], 'within verify.tolerance');
  t.notOk(
    compareRuns(manifest('0.2.0', 0.75), manifest('0.2.0', 0.8), 0).some((d) => d.kind === 'tool'),
    'same version: no version note',
  );
});
