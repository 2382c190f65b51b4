// Statistics held to outside references:
// - distributions: scipy.stats 1.10 (Debian's python3-scipy) and mpmath (t quantiles to 30 digits),
//   fixtures/stats-scipy.json from stats_reference.py;
// - DeLong's interval and paired test: R's pROC 1.18 (Debian's r-cran-proc) on scikit-learn's bundled
//   breast-cancer table, fixtures/stats-proc.json from stats_reference.R;
// - bootstrap draws and permutations: the vectors of docs/resample-spec.md §7, produced by an independent
//   Python reading of the spec (resample_v1.py), which CI re-runs on them.
import { spawnSync } from 'node:child_process';
import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { root } from '../helpers.js';
import t from 'tap';
import { delongInterval, delongPaired, placements } from '../../src/stats/delong.js';
import { BootstrapDrawer, permutedLabels } from '../../src/stats/resample.js';
import { binomialCdf, normalCdf, normalQuantile, normalUpper, tCdf, tQuantile } from '../../src/stats/special.js';
import { idOrder } from '../../src/split/key.js';

const ref = (name: string) => JSON.parse(readFileSync(join(root, `test/reference/fixtures/${name}`), 'utf8'));
const close = (a: number, b: number, rel: number) => Math.abs(a - b) <= rel * Math.max(1, Math.abs(b));

t.test('t, normal and binomial distributions match scipy.stats', async (t) => {
  const s = ref('stats-scipy.json');
  const bad: string[] = [];
  // scipy 1.10's t.ppf is good to about 1e-9; the 30-digit mpmath quantiles hold ours to 1e-11 (the worst, df 1000, is 1.4e-12).
  for (const [p, df, want] of s.t_ppf) if (!close(tQuantile(p, df), want, 1e-8)) bad.push(`t.ppf(${p}, ${df}) ≠ ${want}`);
  for (const [p, df, want] of s.t_ppf_mpmath) if (!close(tQuantile(p, df), want, 1e-11)) bad.push(`t quantile (${p}, ${df}) ≠ ${want}`);
  for (const [x, df, want] of s.t_cdf) if (!close(tCdf(x, df), want, 1e-12)) bad.push(`t.cdf(${x}, ${df}) = ${tCdf(x, df)} ≠ ${want}`);
  for (const [p, want] of s.norm_ppf)
    if (!close(normalQuantile(p), want, 1e-12)) bad.push(`norm.ppf(${p}) = ${normalQuantile(p)} ≠ ${want}`);
  for (const [x, want] of s.norm_cdf)
    if (Math.abs(normalCdf(x) - want) > 1e-15 + 1e-12 * want) bad.push(`norm.cdf(${x}) = ${normalCdf(x)} ≠ ${want}`);
  for (const [x, want] of s.norm_sf)
    if (!(Math.abs(normalUpper(x) - want) <= 1e-12 * want)) bad.push(`norm.sf(${x}) = ${normalUpper(x)} ≠ ${want}`);
  for (const [k, n, p, want] of s.binom_cdf) if (!close(binomialCdf(k, n, p), want, 1e-12)) bad.push(`binom.cdf(${k}, ${n}) ≠ ${want}`);
  t.same(
    bad,
    [],
    `${s.t_ppf.length + s.t_ppf_mpmath.length + s.t_cdf.length + s.norm_ppf.length + s.norm_cdf.length + s.norm_sf.length + s.binom_cdf.length} values`,
  );
});

function breastCancer(): { columns: Map<string, Float64Array>; malignant: Uint8Array } {
  const lines = readFileSync(join(root, 'test/reference/data/breast-cancer.csv'), 'utf8').trim().split('\n');
  const header = lines[0].split(',');
  const rows = lines.slice(1).map((l) => l.split(','));
  const columns = new Map(header.slice(1, -1).map((h, j) => [h, Float64Array.from(rows, (r) => Number(r[j + 1]))]));
  return { columns, malignant: Uint8Array.from(rows, (r) => (r[r.length - 1] === 'malignant' ? 1 : 0)) };
}

function placementsOf(score: Float64Array, positive: Uint8Array, rows: number[]) {
  const pos = Float64Array.from(
    rows.filter((i) => positive[i]),
    (i) => score[i],
  );
  const neg = Float64Array.from(
    rows.filter((i) => !positive[i]),
    (i) => score[i],
  );
  return placements(pos, neg);
}

t.test("DeLong's interval and paired test match pROC on the breast-cancer table", async (t) => {
  const r = ref('stats-proc.json');
  const { columns, malignant } = breastCancer();
  const all = Array.from(malignant.keys());
  for (const c of r.single) {
    // pROC's subsample in R is seq(1, n, by = 7): 1-based rows 1, 8, 15, …
    const rows = c.rows === all.length ? all : all.filter((i) => i % 7 === 0);
    const p = placementsOf(columns.get(c.column)!, malignant, rows);
    const ci = delongInterval(p, 0.95)!;
    t.ok(close(p.auc, c.auc, 1e-12), `${c.column} (${c.rows} rows): AUC ${p.auc} vs pROC ${c.auc}`);
    t.ok(close(ci.se * ci.se, c.var, 1e-10), `${c.column}: DeLong variance ${ci.se * ci.se} vs pROC ${c.var}`);
    t.ok(
      close(ci.interval[0], c.lower, 1e-10) && close(ci.interval[1], c.upper, 1e-10),
      `${c.column}: interval ${ci.interval} vs pROC [${c.lower}, ${c.upper}]`,
    );
  }
  for (const pair of r.paired) {
    const a = placementsOf(columns.get(pair.a)!, malignant, all);
    const b = placementsOf(columns.get(pair.b)!, malignant, all);
    const test = delongPaired(a, b)!;
    t.ok(close(test.z, pair.z, 1e-9), `${pair.a} vs ${pair.b}: z ${test.z} vs pROC ${pair.z}`);
    t.ok(close(test.p, pair.p, 1e-9), `${pair.a} vs ${pair.b}: p ${test.p} vs pROC ${pair.p}`);
  }
});

const specVectors = () => {
  const text = readFileSync(join(root, 'docs/resample-spec.md'), 'utf8');
  return [...text.matchAll(/^\{.*\}$/gm)].map((m) => JSON.parse(m[0]));
};

t.test('bootstrap draws and permutations reproduce the spec vectors (resample-spec §7)', async (t) => {
  const vectors = specVectors();
  t.ok(vectors.length >= 8, `${vectors.length} vectors`);
  const drawer = new BootstrapDrawer();
  for (const v of vectors) {
    if ('drawn' in v) {
      const rows = Int32Array.from({ length: v.rows }, (_, i) => i);
      const out = new Int32Array(v.rows);
      drawer.draw(rows, v.seed, v.replicate, v.repeat, v.label, out, 0);
      t.same(Array.from(out), v.drawn, `bootstrap seed ${v.seed} replicate ${v.replicate} repeat ${v.repeat} ${v.label}`);
    } else {
      const classes = [...new Set<string>(v.labels)].sort();
      const y = Int32Array.from(v.labels as string[], (l) => classes.indexOf(l));
      const got = permutedLabels(v.ids, y, idOrder(v.ids), v.seed, v.permutation, v.strata);
      t.same(
        Array.from(got, (c) => classes[c]),
        v.permuted,
        `permutation seed ${v.seed} #${v.permutation}${v.strata ? ' within strata' : ''}`,
      );
    }
  }
});

t.test('the independent Python reading of the spec agrees with the vectors', async (t) => {
  const python = '/usr/bin/python3';
  const file = join(tmpdir(), `resample-vectors-${process.pid}.jsonl`);
  writeFileSync(
    file,
    specVectors()
      .map((v) => JSON.stringify(v))
      .join('\n') + '\n',
  );
  const r = spawnSync(python, [join(root, 'test/reference/resample_v1.py'), 'check', file], { encoding: 'utf8' });
  rmSync(file, { force: true });
  // CI installs Debian's python3; a machine without it cannot run this cross-check.
  t.equal(r.error, undefined, `${python} runs`);
  t.equal(r.status, 0, r.stdout + r.stderr);
});
