// Calibration of the permutation p-value (Ojala & Garriga 2010, test 1): on datasets whose labels
// are independent of the features, p must be uniform on {1/(N+1), …, 1}. The features are
// scikit-learn's bundled breast-cancer table (three columns, first 200 rows); each null dataset gets labels from
// SHA-256 bits of (dataset, id), which know nothing of the features. The split is plain k-fold,
// whose folds do not depend on the labels, so observed and permuted labelings are exchangeable
// exactly (stratified folds would favour the observed labeling a little). The metric is the
// continuous log-loss, so ties do not make p conservative.
// Check: Kolmogorov–Smirnov distance of the M p-values from the uniform distribution, below the
// asymptotic critical value at α = 0.01, c(α)/√M with c from scipy.stats.kstwobign (Debian's
// python3-scipy) — conservative for a discrete distribution such as this (Noether 1963).
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { validateProtocol } from '../../src/io/validate.js';
import type { Protocol } from '../../src/protocol/types.js';
import { crossValidate } from '../../src/run/cross-validate.js';
import { permutationResult, permutedScores } from '../../src/run/permutation.js';
import { root, sha256, tempDir } from '../helpers.js';

const DATASETS = 150;
const PERMUTATIONS = 39;

t.test('null datasets: permutation p-values are uniform (KS at α = 0.01)', async (t) => {
  // The first 200 rows of the table are enough (and keep the 4,000 cross-validations quick).
  const csv = readFileSync(join(root, 'test/reference/data/breast-cancer.csv'), 'utf8').split('\n').slice(0, 201).join('\n') + '\n';
  const dir = tempDir({
    'bc.csv': csv,
    'p.yaml':
      `foldseal: 1\nname: null-calibration\ndata: {file: bc.csv, sha256: "${sha256(csv)}", id: id, label: diagnosis, ` +
      'features: [mean_radius, mean_texture, mean_smoothness]}\nsplit: {rule: kfold, folds: 5, seed: 8}\nmodel: {kind: gaussian-nb}\n' +
      'metrics: [log-loss]\n',
  });
  const report = await validateProtocol(`${dir}/p.yaml`);
  t.ok(report.table && report.assignment && report.protocol, 'protocol and data read');
  const table = report.table!;
  const pValues: number[] = [];
  for (let d = 1; d <= DATASETS; d++) {
    const y = Int32Array.from(table.ids, (id) => createHash('sha256').update(`null-${d}-${id}`).digest()[0] & 1);
    const nullTable = { ...table, y, labels: Array.from(y, (c) => table.classes[c]) };
    const p: Protocol = {
      ...report.protocol!,
      statistics: { level: 0.95, permutation: { count: PERMUTATIONS, seed: d, metric: 'log-loss', within: 'all' } },
    };
    const observed = crossValidate(p, nullTable, report.assignment!).summary['log-loss'].mean!;
    pValues.push(permutationResult(p, observed, permutedScores(p, nullTable, report.assignment!, 1, PERMUTATIONS)).pValue);
  }
  let distance = 0;
  for (let k = 1; k <= PERMUTATIONS + 1; k++) {
    const x = k / (PERMUTATIONS + 1);
    const below = pValues.filter((p) => p <= x + 1e-12).length / DATASETS;
    distance = Math.max(distance, Math.abs(below - x));
  }
  const r = spawnSync('/usr/bin/python3', ['-c', 'from scipy.stats import kstwobign; print(repr(kstwobign.isf(0.01)))'], {
    encoding: 'utf8',
  });
  t.equal(r.status, 0, r.stderr);
  const critical = Number(r.stdout) / Math.sqrt(DATASETS);
  t.ok(Math.abs(Number(r.stdout) - 1.6276) < 1e-3, 'c(0.01) ≈ 1.6276 (Massey 1951, from memory)');
  t.ok(distance < critical, `KS distance ${distance.toFixed(4)} < ${critical.toFixed(4)} over ${DATASETS} null datasets`);
  // Not degenerate: the p-values spread over the range.
  t.ok(Math.min(...pValues) <= 0.06 && Math.max(...pValues) >= 0.94, 'p-values reach both ends');
});
