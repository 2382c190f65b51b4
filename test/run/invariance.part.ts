/** Same data in another row order, or as TSV, gives the same folds, scores and predictions byte for byte. */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { validateProtocol } from '../../src/io/validate.js';
import { runProtocol } from '../../src/run/run.js';
import { assignmentCsv } from '../../src/split/csv.js';
import { root, sha256, tempDir } from '../helpers.js';

const demo = readFileSync(join(root, 'protocols', 'data', 'seedlings.csv'), 'utf8');

function shuffled(csv: string): string {
  const [head, ...rows] = csv.trimEnd().split('\n');
  // A fixed, obviously different order: odd rows reversed, then even rows.
  const odd = rows.filter((_, i) => i % 2).reverse();
  const even = rows.filter((_, i) => i % 2 === 0);
  return [head, ...odd, ...even].join('\n') + '\n';
}

async function runOn(file: string, text: string, rule: string) {
  const dir = tempDir({ [file]: text });
  writeFileSync(
    join(dir, 'p.yaml'),
    `foldseal: 1\nname: inv\ndata: {file: ${file}, sha256: "${sha256(text)}", id: seedling_id, label: resistant, group: tray, ` +
      `features: {exclude: [bench]}}\nsplit: ${rule}\npreprocess: [standardize, {select: {top: 4, by: f-test}}]\nmodel: {kind: ` +
      `logistic, options: {l2: 2}}\nmetrics: [accuracy, roc-auc, log-loss]\n`,
  );
  const r = await validateProtocol(join(dir, 'p.yaml'));
  t.same(
    r.problems.filter((p) => p.severity === 'error'),
    [],
  );
  const out = runProtocol({
    protocol: r.protocol!,
    raw: r.raw,
    protocolFile: 'p.yaml',
    table: r.table!,
    dataSha256: r.dataSha256!,
    assignment: r.assignment!,
    warnings: [],
  });
  const results = JSON.parse(out.files['results.json']);
  delete results.data.sha256;
  delete results.protocol.sha256;
  // models.json records the protocol hash (which includes the data hash); everything else must agree.
  delete results.files['models.json'];
  const models = JSON.parse(Buffer.from(out.files['models.json']!).toString('utf8'));
  delete models['protocol-sha256'];
  return { folds: assignmentCsv(r.assignment!), predictions: Buffer.from(out.predictions!).toString('utf8'), results, models };
}

for (const rule of [
  '{rule: stratified-kfold, folds: 5, repeats: 2, seed: 99}',
  '{rule: grouped-kfold, folds: 4, seed: 3}',
  '{rule: holdout, test-fraction: 0.25, seed: 5, assign: stable}',
]) {
  t.test(`row order and file format do not matter: ${rule}`, async (t) => {
    const base = await runOn('d.csv', demo, rule);
    const reordered = await runOn('d.csv', shuffled(demo), rule);
    const tsv = await runOn('d.tsv', demo.replaceAll(',', '\t'), rule);
    t.equal(reordered.folds, base.folds, 'assignment CSV identical after shuffling');
    t.equal(tsv.folds, base.folds, 'assignment CSV identical from TSV');
    t.equal(reordered.predictions, base.predictions, 'predictions identical after shuffling');
    t.equal(tsv.predictions, base.predictions, 'predictions identical from TSV');
    t.same(reordered.results, base.results, 'results identical apart from the hashes');
    t.same(reordered.models, base.models, 'fold models identical');
    const again = await runOn('d.csv', demo, rule);
    t.equal(again.predictions, base.predictions, 'two runs agree');
  });
}
