// Data as expression-matrix users hold it: scikit-learn's bundled breast-cancer table written
// features-in-rows (one row per feature, one column per sample), gzip-compressed, with the label
// in a separate sample sheet. Checked against the reference: its out-of-fold probabilities equal
// scikit-learn 1.2.1's on the same folds (fixtures/breast-cancer-ftest-gaussian-nb.json, made by
// sklearn_reference.py) to 1e-9, exactly as the samples-in-rows CSV does.
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import t from 'tap';
import { newRowsLayout } from '../../src/table/detect.js';
import { cli, referenceTable, root, sha256, tempDir } from '../helpers.js';

const { header, body } = referenceTable('breast-cancer.csv');
const ref = JSON.parse(readFileSync(join(root, 'test/reference/fixtures/breast-cancer-ftest-gaussian-nb.json'), 'utf8'));
const label = header.indexOf('diagnosis');
const features = header.map((_, c) => c).filter((c) => c !== 0 && c !== label);
// Features in rows: first column the feature name, then one column per sample, the header naming the samples.
const matrix =
  ['feature', ...body.map((r) => r[0])].join('\t') +
  '\n' +
  features.map((c) => [header[c], ...body.map((r) => r[c])].join('\t')).join('\n') +
  '\n';
// The sample sheet: id, label and a covariate column (a batch number derived from the row position) that must never become a feature.
const sheetRows = body.map((r, i) => `${r[0]},${r[label]},${(i % 3) + 1}`);
const sheet = ['sample,diagnosis,batch', ...sheetRows].join('\n') + '\n';
const gz = gzipSync(Buffer.from(matrix));

function protocol(files: { matrix: string; matrixBytes: Uint8Array; sheet: string; sheetBytes: string }, extra = ''): string {
  return (
    'foldseal: 1\nname: bc-features-in-rows\ndata:\n' +
    `  file: ${files.matrix}\n  sha256: "${sha256(files.matrixBytes)}"\n  layout: features-in-rows\n` +
    `  samples: {file: ${files.sheet}, sha256: "${sha256(files.sheetBytes)}"${extra}}\n` +
    '  id: sample\n  label: diagnosis\n  positive: malignant\n' +
    'split: {rule: stratified-kfold, folds: 10, seed: 1993}\n' +
    'preprocess: [standardize, {select: {top: 10, by: f-test}}]\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy, roc-auc, log-loss]\n'
  );
}

t.test('a gzipped features-in-rows matrix with a sample sheet runs end to end and matches scikit-learn', async (t) => {
  const dir = tempDir({ 'expr.tsv.gz': gz, 'samples.csv': sheet });
  writeFileSync(join(dir, 'p.yaml'), protocol({ matrix: 'expr.tsv.gz', matrixBytes: gz, sheet: 'samples.csv', sheetBytes: sheet }));
  const v = await cli(['validate', 'p.yaml'], dir);
  t.equal(v.code, 0, v.stderr + v.stdout);
  // The declared hash is of the bytes on disk: `foldseal hash` (like sha256sum) prints it.
  t.match((await cli(['hash', 'expr.tsv.gz'], dir)).stdout, sha256(gz));
  const r = await cli(['run', 'p.yaml', '--out', 'res'], dir);
  t.equal(r.code, 0, r.stderr);
  const results = JSON.parse(readFileSync(join(dir, 'res', 'results.json'), 'utf8'));
  t.equal(results.data.rows, 569);
  t.equal(results.data.layout, 'features-in-rows');
  t.same(results.data.samples, { sha256: sha256(sheet), 'left-out': { 'data-only': 0, 'sheet-only': 0 } });
  t.equal(results.data.features.length, 30, 'the 30 measurements; the sheet’s batch column is not a feature');
  t.notOk(results.data.features.includes('batch'));
  const proba = new Map<string, number[]>();
  for (const line of readFileSync(join(dir, 'res', 'predictions.csv'), 'utf8')
    .trimEnd()
    .split('\n')
    .slice(1)) {
    const cells = line.split(',');
    proba.set(cells[0], [Number(cells[5]), Number(cells[6])]);
  }
  let worst = 0;
  let compared = 0;
  for (const f of ref.folds)
    f.ids.forEach((id: string, i: number) => {
      for (let c = 0; c < 2; c++) worst = Math.max(worst, Math.abs(proba.get(id)![c] - f.proba[i][c]));
      compared++;
    });
  t.equal(compared, 569);
  t.ok(worst <= 1e-9, `largest out-of-fold probability difference from scikit-learn ${worst.toExponential(2)} ≤ 1e-9`);
  // verify --rerun of such a run: in the end-to-end test below.
});

t.test('gzip is recognized by its bytes, not its name; a broken one is a located error', async (t) => {
  const dir = tempDir({ 'expr.tsv': gz, 'samples.csv': sheet });
  writeFileSync(join(dir, 'p.yaml'), protocol({ matrix: 'expr.tsv', matrixBytes: gz, sheet: 'samples.csv', sheetBytes: sheet }));
  t.equal((await cli(['validate', 'p.yaml'], dir)).code, 0);
  const broken = Buffer.concat([gz.subarray(0, 200), Buffer.alloc(50)]);
  writeFileSync(join(dir, 'broken.tsv.gz'), broken);
  writeFileSync(join(dir, 'q.yaml'), protocol({ matrix: 'broken.tsv.gz', matrixBytes: broken, sheet: 'samples.csv', sheetBytes: sheet }));
  const r = await cli(['validate', 'q.yaml'], dir);
  t.equal(r.code, 1);
  t.match(r.stderr, /q\.yaml:\d+:\d+: error: file broken\.tsv\.gz starts like a gzip file but cannot be decompressed/);
});

t.test('samples in only one file: an error naming them, or left out and counted', async (t) => {
  const short = ['sample,diagnosis,batch', ...sheetRows.slice(0, -2), 'extra-1,benign,1'].join('\n') + '\n';
  const dir = tempDir({ 'expr.tsv.gz': gz, 'samples.csv': short });
  const files = { matrix: 'expr.tsv.gz', matrixBytes: gz, sheet: 'samples.csv', sheetBytes: short };
  writeFileSync(join(dir, 'p.yaml'), protocol(files));
  const r = await cli(['validate', 'p.yaml'], dir);
  t.equal(r.code, 1);
  t.match(r.stderr, /error: 2 samples of expr\.tsv\.gz are not in the sample sheet: "/);
  t.match(r.stderr, /error: 1 sample-sheet row are not in expr\.tsv\.gz: "extra-1"/);
  writeFileSync(join(dir, 'q.yaml'), protocol(files, ', unmatched: drop'));
  const run = await cli(['run', 'q.yaml', '--out', 'res'], dir);
  t.equal(run.code, 0, run.stderr);
  t.match(run.stderr, /warning: 2 samples of expr\.tsv\.gz were left out: not in the sample sheet/);
  const results = JSON.parse(readFileSync(join(dir, 'res', 'results.json'), 'utf8'));
  t.equal(results.data.rows, 567);
  t.same(results.data.samples['left-out'], { 'data-only': 2, 'sheet-only': 1 });
});

t.test('problems in the sample sheet point into the sample sheet', async (t) => {
  const bad = sheet.replace(',malignant,', ',,');
  const dir = tempDir({ 'expr.tsv.gz': gz, 'samples.csv': bad });
  writeFileSync(join(dir, 'p.yaml'), protocol({ matrix: 'expr.tsv.gz', matrixBytes: gz, sheet: 'samples.csv', sheetBytes: bad }));
  const r = await cli(['validate', 'p.yaml'], dir);
  t.equal(r.code, 1);
  t.match(r.stderr, /samples\.csv:\d+:\d+: error: row \d+ has no label/);
  const noSheet = protocol({ matrix: 'expr.tsv.gz', matrixBytes: gz, sheet: 'samples.csv', sheetBytes: bad }).replace(
    / {2}samples: .*\n/,
    '',
  );
  writeFileSync(join(dir, 'q.yaml'), noSheet);
  const q = await cli(['validate', 'q.yaml'], dir);
  t.equal(q.code, 1);
  t.match(q.stderr, /error: a features-in-rows data file holds no labels: name a sample sheet under data\.samples/);
});

t.test('a label value in no class, or in two, is an error at its place', async (t) => {
  const dir = tempDir({ 'expr.tsv.gz': gz, 'samples.csv': sheet });
  const base = protocol({ matrix: 'expr.tsv.gz', matrixBytes: gz, sheet: 'samples.csv', sheetBytes: sheet }).replace(
    '  positive: malignant\n',
    '  positive: M\n  where: {batch: ["1", "2"]}\n  classes: {B: [benign], M: [malign]}\n',
  );
  writeFileSync(join(dir, 'q.yaml'), base);
  const q = await cli(['validate', 'q.yaml'], dir);
  t.equal(q.code, 1);
  t.match(q.stderr, /samples\.csv:\d+:\d+: error: label value "malignant" is in no class of data\.classes/);
  writeFileSync(join(dir, 'w.yaml'), base.replace('B: [benign]', 'B: [benign, malign]'));
  t.match((await cli(['validate', 'w.yaml'], dir)).stderr, /error: label value "malign" is listed in class "B" and in class "M"/);
});

t.test('apply: held-back samples with only the features the fold models read, scored on their own labels', async (t) => {
  const inRun = sheetRows.filter((r) => !r.endsWith(',3'));
  const heldBack = body.filter((_, i) => i % 3 === 2);
  const runSheet = ['sample,diagnosis,batch', ...inRun].join('\n') + '\n';
  const runMatrix =
    ['feature', ...body.filter((_, i) => i % 3 !== 2).map((r) => r[0])].join('\t') +
    '\n' +
    features.map((c) => [header[c], ...body.filter((_, i) => i % 3 !== 2).map((r) => r[c])].join('\t')).join('\n') +
    '\n';
  const runGz = gzipSync(Buffer.from(runMatrix));
  const dir = tempDir({ 'expr.tsv.gz': runGz, 'samples.csv': runSheet });
  writeFileSync(
    join(dir, 'p.yaml'),
    protocol({ matrix: 'expr.tsv.gz', matrixBytes: runGz, sheet: 'samples.csv', sheetBytes: runSheet }).replace('folds: 10', 'folds: 5'),
  );
  t.equal((await cli(['run', 'p.yaml', '--out', 'res'], dir)).code, 0);
  const models = JSON.parse(readFileSync(join(dir, 'res', 'models.json'), 'utf8'));
  const used = new Set<number>(models.folds.flatMap((f: { pipeline: { input: number[] } }) => f.pipeline.input));
  t.ok(used.size >= 10 && used.size < 30, `the fold models read ${used.size} of the 30 features`);
  const keep = [...used].sort((a, b) => a - b).map((j) => models.features[j] as string);
  // The held-back samples as a plain CSV: id, label and only the features some fold model reads.
  const cols = keep.map((name) => header.indexOf(name));
  const table =
    ['sample,diagnosis,' + keep.join(','), ...heldBack.map((r) => [r[0], r[label], ...cols.map((c) => r[c])].join(','))].join('\n') + '\n';
  writeFileSync(join(dir, 'held-back.csv'), table);
  const a = await cli(['apply', 'res', 'held-back.csv', '--out', 'applied.csv'], dir);
  t.equal(a.code, 0, a.stderr);
  t.match(a.stderr, new RegExp(`scored on the new rows' own labels \\(column "diagnosis"\\): ${heldBack.length} rows`));
  t.match(a.stderr, /\n {2}roc-auc\s+0\.9\d{3}\n/);
  const applied = readFileSync(join(dir, 'applied.csv'), 'utf8').split('\n');
  t.equal(applied[0], 'id,label,source,predicted,agreement,p_benign,p_malignant');
  t.equal(applied.length - 2, heldBack.length);
  // The same samples features-in-rows and gzipped, without labels: the same predictions.
  const fir =
    ['feature', ...heldBack.map((r) => r[0])].join('\t') +
    '\n' +
    cols.map((c) => [header[c], ...heldBack.map((r) => r[c])].join('\t')).join('\n') +
    '\n';
  writeFileSync(join(dir, 'held-back.tsv.gz'), gzipSync(Buffer.from(fir)));
  // The layout is detected (no --layout): the header names samples, the first column features.
  const b = await cli(['apply', 'res', 'held-back.tsv.gz', '--out', 'applied-2.csv'], dir);
  t.equal(b.code, 0, b.stderr);
  const strip = (lines: string[]) =>
    lines.map((l) =>
      l
        .split(',')
        .filter((_, i) => i !== 1)
        .join(','),
    );
  t.same(readFileSync(join(dir, 'applied-2.csv'), 'utf8').split('\n'), strip(applied));
  // A feature some fold model reads cannot be left out.
  writeFileSync(
    join(dir, 'short.csv'),
    table
      .split('\n')
      .map((l) => l.split(',').slice(0, -1).join(','))
      .join('\n'),
  );
  const c = await cli(['apply', 'res', 'short.csv'], dir);
  t.equal(c.code, 1);
  t.match(c.stderr, new RegExp(`error: feature "${keep[keep.length - 1]}" is not in the new-rows file's header`));
});

t.test('end to end with no hand step: init → validate → run → verify --rerun → apply on held-back samples', async (t) => {
  const dir = tempDir({ 'expr.tsv.gz': gz, 'samples.csv': sheet });
  const init = await cli(
    [
      'init',
      'expr.tsv.gz',
      '--samples',
      'samples.csv',
      '--id',
      'sample',
      '--label',
      'diagnosis',
      '--where',
      'batch=1,2',
      '--class',
      'B=benign',
      '--class',
      'M=malignant',
      '--positive',
      'M',
      '--out',
      'p.yaml',
    ],
    dir,
  );
  t.equal(init.code, 0, init.stderr);
  t.match(init.stderr, 'wrote p.yaml (features in rows, 380 rows, 2 classes, 30 features; 380 of 569 rows kept by --where)');
  const text = readFileSync(join(dir, 'p.yaml'), 'utf8');
  t.match(text, 'layout: features-in-rows');
  t.equal((await cli(['validate', 'p.yaml'], dir)).code, 0);
  const r = await cli(['run', 'p.yaml', '--out', 'res'], dir);
  t.equal(r.code, 0, r.stderr);
  t.equal((await cli(['folds', 'p.yaml', '--out', 'folds.csv'], dir)).code, 0);
  const ref = spawnSync(
    '/usr/bin/python3',
    [
      join(root, 'test/reference/layout_reference.py'),
      join(dir, 'expr.tsv.gz'),
      join(dir, 'samples.csv'),
      join(dir, 'folds.csv'),
      'sample',
      'diagnosis',
      JSON.stringify({ batch: ['1', '2'] }),
      JSON.stringify({ B: ['benign'], M: ['malignant'] }),
      '0',
    ],
    { encoding: 'utf8' },
  );
  t.equal(ref.status, 0, ref.stderr);
  const want = JSON.parse(ref.stdout) as Record<string, Record<string, number>>;
  let worst = 0;
  let n = 0;
  for (const line of readFileSync(join(dir, 'res', 'predictions.csv'), 'utf8')
    .trimEnd()
    .split('\n')
    .slice(1)) {
    const [id, , , , , pB, pM] = line.split(',');
    worst = Math.max(worst, Math.abs(Number(pB) - want[id].B), Math.abs(Number(pM) - want[id].M));
    n++;
  }
  t.equal(n, 380);
  t.ok(worst <= 1e-9, `out-of-fold probabilities within ${worst.toExponential(2)} of pandas + scikit-learn`);
  const results = JSON.parse(readFileSync(join(dir, 'res', 'results.json'), 'utf8'));
  t.same(results.classes, ['B', 'M']);
  t.same(results.data.where, { columns: { batch: ['1', '2'] }, 'rows-before': 569, 'rows-after': 380 });
  t.same(results.data['class-map'], { B: ['benign'], M: ['malignant'] });
  t.notOk(results.data.features.includes('batch'), 'the filtered column is not a feature');
  const v = await cli(['verify', 'res/manifest.json', '--rerun', '--allow-unsigned', '--allow-unpinned'], dir);
  t.equal(v.code, 0, v.stdout + v.stderr);
  // The held-back samples (batch 3), as the lab would send them: the sheet's label and every measurement.
  const held = ['sample,diagnosis,' + features.map((c) => header[c]).join(',')];
  body.forEach((row, i) => {
    if (i % 3 === 2) held.push([row[0], row[label], ...features.map((c) => row[c])].join(','));
  });
  writeFileSync(join(dir, 'batch3.csv'), held.join('\n') + '\n');
  const a = await cli(['apply', 'res', 'batch3.csv', '--out', 'batch3-applied.csv'], dir);
  t.equal(a.code, 0, a.stderr);
  t.match(a.stderr, `scored on the new rows' own labels (column "diagnosis"): ${held.length - 1} rows`);
});

t.test('the layout of new rows, from their header and first column', async (t) => {
  const f = ['mean_radius', 'mean_texture'];
  t.equal(newRowsLayout(['id', 'mean_radius'], ['a'], f, 'id'), 'samples-in-rows');
  t.equal(newRowsLayout(['sample', 'x'], ['a'], f, 'sample'), 'samples-in-rows', 'the id column alone says samples in rows');
  t.equal(newRowsLayout(['feature', 'S1', 'S2'], ['mean_texture', 'other'], f, 'sample'), 'features-in-rows');
  t.equal(newRowsLayout(['a', 'b'], ['c'], f, undefined), undefined);
});
