/**
 * The audit's notes and its other branches on iris (as bundled with scikit-learn: its rows are
 * sorted by species, and it holds one exact duplicate pair): row order, ids that name or follow
 * the class, a numeric covariate that goes with the label, a declared group the split ignores,
 * and copies that a grouped split keeps in one fold.
 */
import t from 'tap';
import { cli, referenceTable, sha256, tempDir } from '../helpers.js';

const iris = referenceTable('iris.csv');

async function audited(csv: string, extra: string[], split = 'stratified-kfold', id = 'id') {
  const p = [
    'foldseal: 1',
    'name: notes',
    'data:',
    '  file: data.csv',
    `  sha256: "${sha256(csv)}"`,
    `  id: ${id}`,
    '  label: species',
    ...extra,
    `split: {rule: ${split}, folds: 3, seed: 5}`,
    'model: {kind: gaussian-nb}',
  ].join('\n');
  const r = await cli(['audit', 'p.yaml', '--format', 'json'], tempDir({ 'data.csv': csv, 'p.yaml': p }));
  return JSON.parse(r.stdout) as { findings: { code: string; severity: string; message: string }[]; selectionBias: unknown };
}

t.test('iris: the copy pair, and the rows sorted by species (a note: folds ignore row order)', async (t) => {
  const { findings, selectionBias } = await audited(iris.csv, []);
  t.equal(selectionBias, null, 'no selection step: no demonstration');
  t.match(findings.find((f) => f.code === 'audit-duplicates')!.message, /"iris-102", "iris-143"/);
  t.match(
    findings.find((f) => f.code === 'audit-id-label'),
    { severity: 'note', message: /ordered by class/ },
  );
  t.notOk(
    findings.some((f) => f.code === 'audit-label-proxy'),
    'petal sizes overlap between versicolor and virginica',
  );
});

t.test('ids that spell the class, numeric ids in class order, a numeric covariate, an unused declared group', async (t) => {
  const lines = iris.csv.trimEnd().split('\n');
  // Shuffle the row order deterministically, so only the ids and the covariate follow the class.
  const body = lines.slice(1).sort((a, b) => sha256(a).localeCompare(sha256(b)));
  const species = (l: string) => l.split(',')[5];
  const named = ['name,sepal_length,sepal_width,petal_length,petal_width,species,num,age,plot'].concat(
    body.map((l, i) => {
      const cells = l.split(',');
      const k = ['setosa', 'versicolor', 'virginica'].indexOf(species(l));
      return [`${species(l)}-${i}`, ...cells.slice(1), String(k * 1000 + i), String(20 + k * 30 + (i % 17)), `P${i % 40}`].join(',');
    }),
  );
  const csv = named.join('\n') + '\n';
  const { findings } = await audited(
    csv,
    ['  group: plot', '  features: [sepal_length, sepal_width, petal_length, petal_width]'],
    'stratified-kfold',
    'name',
  );
  const messages = findings.map((f) => `${f.code} ${f.severity}: ${f.message}`).join('\n');
  t.match(messages, /audit-id-label note: 150 ids of 150 contain their row's class name/);
  t.notMatch(messages, /rows of the data file are ordered by class/, 'shuffled rows');
  t.match(messages, /audit-confounded warning: covariate "age" goes with the label: ROC AUC 1\.000/);
  t.match(messages, /audit-split-groups warning: column "plot" \(declared as data.group\)/);
  const numbered = named.map((l, i) => (i === 0 ? l.replace(/^name/, 'key') : l.replace(/^[^,]+/, l.split(',')[6])));
  const second = await audited(
    numbered.join('\n') + '\n',
    ['  features: [sepal_length, sepal_width, petal_length, petal_width]'],
    'stratified-kfold',
    'key',
  );
  t.ok(
    second.findings.some((f) => /numeric ids are ordered by class/.test(f.message)),
    'numeric ids in class order',
  );
});

t.test('copies a grouped split keeps together are a note, not a warning', async (t) => {
  const lines = iris.csv.trimEnd().split('\n');
  const csv =
    [
      `${lines[0]},plot`,
      ...lines.slice(1).map((l) => `${l},${l.startsWith('iris-102,') || l.startsWith('iris-143,') ? 'same' : l.split(',')[0]}`),
    ].join('\n') + '\n';
  const { findings } = await audited(csv, ['  group: plot'], 'grouped-kfold');
  t.match(
    findings.find((f) => f.code === 'audit-duplicates'),
    { severity: 'note', message: /always share a fold/ },
  );
  t.notOk(
    findings.some((f) => f.code === 'audit-split-groups'),
    'the split keeps the declared groups',
  );
});

t.test('a column whose values repeat like subject ids is a note; a category is not', async (t) => {
  const lines = iris.csv.trimEnd().split('\n');
  const csv =
    [`${lines[0]},visit,site`, ...lines.slice(1).map((l, i) => `${l},V${(i * 7) % 50},${['north', 'south'][i % 2]}`)].join('\n') + '\n';
  const { findings } = await audited(csv, ['  features: [sepal_length, sepal_width, petal_length, petal_width]']);
  const groups = findings.filter((f) => f.code === 'audit-split-groups');
  t.equal(groups.length, 1, 'visit only: site has two values, a category');
  t.match(groups[0], { severity: 'note', message: /column "visit" \(its values repeat like ids of subjects\)/ });
});
