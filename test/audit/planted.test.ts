/**
 * The audit end to end. Clean: breast-cancer as bundled with scikit-learn gives no finding. Planted
 * (each leak added to that table): a copied row, a replicate, a patient column split across
 * folds, a feature that is the label in disguise, and a batch that goes with the label — each
 * found where it is. Null data: selecting features outside the folds looks good, inside stays near
 * chance (Ambroise & McLachlan 2002, PNAS 99:6562 — the classic demonstration).
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { cli, referenceTable, sha256, tempDir } from '../helpers.js';

const bc = referenceTable('breast-cancer.csv');
const labelCol = bc.header.indexOf('diagnosis');

function protocol(file: string, csv: string, extra: string[] = [], split = 'stratified-kfold'): string {
  return [
    'foldseal: 1',
    'name: audited',
    'data:',
    `  file: ${file}`,
    `  sha256: "${sha256(csv)}"`,
    '  id: id',
    '  label: diagnosis',
    ...extra,
    `split: {rule: ${split}, folds: 5, repeats: 2, seed: 11}`,
    'preprocess: [standardize, {select: {top: 5, by: t-test}}]',
    'model: {kind: gaussian-nb}',
    'metrics: [roc-auc, accuracy]',
  ].join('\n');
}

interface Finding {
  code: string;
  severity: string;
  message: string;
  file: string | null;
  line: number | null;
  col: number | null;
}

async function audit(dir: string, ...args: string[]) {
  const r = await cli(['audit', 'p.yaml', '--format', 'json', ...args], dir);
  return { code: r.code, json: r.code === 0 || r.code === 1 ? JSON.parse(r.stdout) : undefined, stderr: r.stderr };
}

t.test('a clean open dataset gives no finding, and exit 0', async (t) => {
  const dir = tempDir({ 'data.csv': bc.csv, 'p.yaml': protocol('data.csv', bc.csv) });
  const { code, json } = await audit(dir, '--no-selection-bias');
  t.equal(code, 0);
  t.same(json.findings, []);
  t.same(json.skipped, []);
  t.equal(json.selectionBias, null);
  const text = await cli(['audit', 'p.yaml', '--no-selection-bias'], dir);
  t.match(text.stderr, 'p.yaml: no leak found (0 errors, 0 warnings)');
});

t.test('planted leaks are each found, located in the file that holds them', async (t) => {
  // Data: features, a disguised label, a patient column shared by pairs of rows; two copies appended.
  const header = ['id', ...bc.header.filter((h, i) => i !== labelCol && h !== 'id'), 'stage_code', 'patient_id'];
  const rows = bc.body.map((cells, r) => {
    const features = cells.filter((_, i) => i !== labelCol && i !== 0);
    const disguised = (cells[labelCol] === 'malignant' ? 1 : 0) + (r % 7) / 1000;
    return [cells[0], ...features, String(disguised), `P${String(Math.floor(r / 2)).padStart(3, '0')}`];
  });
  const copy = [...rows[0]];
  copy[0] = 'bc-copy';
  copy[copy.length - 1] = 'P900';
  const replicate = rows[1].map((v, i) => (i > 0 && i <= 30 ? String(Number(v) * (1 + ((i % 3) - 1) * 0.002)) : v));
  replicate[0] = 'bc-rep';
  replicate[replicate.length - 1] = 'P901';
  const all = [...rows, copy, replicate];
  const csv = [header, ...all].map((r) => r.join(',')).join('\n') + '\n';
  // Sample sheet: the label, and a batch that follows it for 9 of 10 rows.
  const labels = [...bc.body.map((c) => c[labelCol]), bc.body[0][labelCol], bc.body[1][labelCol]];
  const sheet =
    [
      'id,diagnosis,batch',
      ...all.map((r, i) => `${r[0]},${labels[i]},${(labels[i] === 'malignant') !== (i % 10 === 0) ? 'B1' : 'B2'}`),
    ].join('\n') + '\n';
  const p = protocol('data.csv', csv, ['  samples:', '    file: sheet.csv', `    sha256: "${sha256(sheet)}"`]);
  const dir = tempDir({ 'data.csv': csv, 'sheet.csv': sheet, 'p.yaml': p });
  const { code, json } = await audit(dir);
  t.equal(code, 1, 'possible leaks: exit 1');
  const of = (c: string) => (json.findings as Finding[]).filter((f) => f.code === c);
  const line = (id: string) => all.findIndex((r) => r[0] === id) + 2;
  // Positions are line and character column; the character column of cell `c` on a line of `cells`.
  const charCol = (cells: string[], c: number) => cells.slice(0, c).join(',').length + (c ? 2 : 1);

  const [dup] = of('audit-duplicates');
  t.match(dup, { severity: 'warning', file: 'data.csv', line: line('bc-0001'), col: charCol(all[0], 1) }, 'the copy, at its first row');
  t.match(dup.message, /"bc-0001", "bc-copy" have identical features/);

  const near = of('audit-near-duplicates');
  t.equal(near.length, 1, 'one near duplicate');
  t.match(near[0], { file: 'data.csv', line: line('bc-0002') });
  t.match(near[0].message, /"bc-0002" and "bc-rep"/);

  const [groups] = of('audit-split-groups');
  t.match(groups, { severity: 'warning', file: 'data.csv', line: 2, col: charCol(all[0], header.indexOf('patient_id')) });
  t.match(groups.message, /column "patient_id" \(named like a subject\)/);

  const proxy = of('audit-label-proxy');
  t.same(
    proxy.map((f) => [f.line, f.col]),
    [[2, charCol(all[0], header.indexOf('stage_code'))]],
    'only the disguised label',
  );

  const [batch] = of('audit-confounded');
  t.match(batch, { severity: 'warning', file: 'sheet.csv', line: 2, col: sheet.split('\n')[1].lastIndexOf(',') + 2 });
  t.match(batch.message, /covariate "batch" goes with the label: Cramér's V 0\.[789]/);

  t.ok(json.selectionBias.careless.mean >= json.selectionBias.honest.mean - 1e-9, 'the careless score is not below the honest one');
  t.equal(of('audit-id-label').length, 0, 'no id or order finding');
});

t.test('policy.forbid-leaks makes check fail on the kinds it lists', async (t) => {
  const csv = bc.csv;
  const withPatient = csv
    .trimEnd()
    .split('\n')
    .map((l, i) => `${l},${i === 0 ? 'donor' : `D${Math.floor(i / 3)}`}`)
    .join('\n');
  const dir = tempDir({ 'data/a.csv': withPatient + '\n', 'protocols/p.yaml': protocol('../data/a.csv', withPatient + '\n') });
  t.equal((await cli(['lock', '.'], dir)).code, 0);
  const lockPath = join(dir, 'foldseal.lock.json');
  const lock = JSON.parse(readFileSync(lockPath, 'utf8'));
  writeFileSync(lockPath, JSON.stringify({ ...lock, policy: { 'forbid-leaks': ['duplicates'] } }, null, 2));
  t.equal((await cli(['check', '.'], dir)).code, 0, 'no duplicates: the gate passes');
  writeFileSync(lockPath, JSON.stringify({ ...lock, policy: { 'forbid-leaks': ['split-groups', 'copies'] } }, null, 2));
  const r = await cli(['check', '.'], dir);
  t.equal(r.code, 1);
  t.match(r.stderr, /data\/a\.csv:2:\d+: error: audited: column "donor" \(named like a subject\)/);
  t.match(r.stderr, /\(the lock's policy forbids split-groups\)/);
  t.match(r.stderr, /policy\.forbid-leaks names "copies", which is not a kind of audit finding/);
});

t.test('null data: selection outside the folds is optimistic, inside stays near chance', async (t) => {
  // Seeded standard normals (mulberry32 + Box–Muller): 60 rows × 2,000 features, labels independent of them.
  let s = 20261202;
  const rand = () => {
    s = (s + 0x6d2b79f5) | 0;
    let x = Math.imul(s ^ (s >>> 15), 1 | s);
    x = (x + Math.imul(x ^ (x >>> 7), 61 | x)) ^ x;
    return ((x ^ (x >>> 14)) >>> 0) / 4294967296;
  };
  const normal = () => Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
  const lines = [['id', 'diagnosis', ...Array.from({ length: 2000 }, (_, j) => `g${j}`)].join(',')];
  for (let r = 0; r < 60; r++)
    lines.push([`s${r}`, r % 2 ? 'a' : 'b', ...Array.from({ length: 2000 }, () => normal().toFixed(4))].join(','));
  const csv = lines.join('\n') + '\n';
  const dir = tempDir({ 'data.csv': csv, 'p.yaml': protocol('data.csv', csv).replace('top: 5', 'top: 20') });
  const { json } = await audit(dir);
  const { honest, careless } = json.selectionBias;
  t.equal(json.selectionBias.metric, 'roc-auc');
  t.equal(json.selectionBias.selectedOnAll, 20);
  // Measured here: careless 0.99, honest 0.33. Honest cross-validation on null data sits at or somewhat
  // below 0.5 (stratified folds shift each test part's class balance against its training part:
  // Parker et al. 2007, BMC Bioinformatics 8:326 — from memory), never near the careless score.
  t.ok(careless.mean > 0.85, `selected on all rows: ROC AUC ${careless.mean}`);
  t.ok(honest.mean < 0.65, `selected inside the folds: ROC AUC ${honest.mean}`);
  t.ok(careless.mean - honest.mean > 0.3, 'the optimism a careless analysis reports');
  const text = await cli(['audit', 'p.yaml'], dir);
  t.match(text.stdout, /selected inside each fold \(what foldseal reports\)\s+0\.\d{3}/);
  t.match(text.stdout, /selected once on all rows, then cross-validated\s+0\.9\d\d/);
});
