import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { cli, spawnCli, protocolText, sha256, smallCsv, tempDir, root } from '../helpers.js';

t.test('run on the demo writes predictions and results and prints the tables', async (t) => {
  const out = join(tempDir(), 'res');
  const r = spawnCli(['run', 'protocols/demo.yaml', '--out', out], root);
  t.equal(r.code, 0, r.stderr);
  t.match(r.stdout, /repeat\s+fold\s+test\s+accuracy/);
  t.match(r.stdout, /baseline accuracy/);
  const predictions = readFileSync(join(out, 'predictions.csv'), 'utf8').split('\n');
  t.equal(predictions[0], 'id,repeat,fold,truth,predicted,p_no,p_yes');
  t.equal(predictions.length - 2, 240, 'one line per id and repeat');
  const results = JSON.parse(readFileSync(join(out, 'results.json'), 'utf8'));
  t.equal(results['foldseal-results'], 1);
  t.equal(results.split.version, 'split-v1');
  t.equal(results.folds.length, 10);
  t.equal(results.files['predictions.csv'], sha256(readFileSync(join(out, 'predictions.csv'))));
  t.notOk(
    readdirSync(join(out, '..')).some((f) => f.includes('.tmp-')),
    'no temporary folder is left behind',
  );

  // The binary ran once above; the rest of this file calls the same entry in this process (quicker under tap).
  const again = await cli(['run', 'protocols/demo.yaml', '--out', out], root);
  t.equal(again.code, 2);
  t.match(again.stderr, 'already exists');
  t.match(again.stderr, 'hint: pass --force to replace it');
  t.equal((await cli(['run', 'protocols/demo.yaml', '--out', out, '--force'], root)).code, 0);
});

function runFails(name: string, files: Record<string, string>, expected: RegExp | string) {
  t.test(name, async (t) => {
    const dir = tempDir(files);
    const r = await cli(['run', 'p.yaml', '--out', 'res'], dir);
    t.equal(r.code, 1, r.stdout + r.stderr);
    t.match(r.stderr, expected);
    t.notOk(existsSync(join(dir, 'res')), 'nothing is written');
  });
}

const csv = smallCsv();
runFails(
  'knn k larger than the training part',
  { 'data.csv': csv, 'p.yaml': protocolText(csv, { model: 'model: {kind: knn, options: {k: 15}}' }) },
  'p.yaml:12:33: error: knn k is 15 but the smallest training part has 10 rows',
);
runFails(
  'select.top larger than the feature count',
  { 'data.csv': csv, 'p.yaml': protocolText(csv, { extra: 'preprocess: [{select: {top: 9, by: variance}}]' }) },
  'p.yaml:13:29: error: select keeps the top 9 features but only 3 are there',
);
const negative = 'id,label,a,b\nr1,x,1,2\nr2,y,-2,3\nr3,x,3,4\nr4,y,4,5\n';
runFails(
  'log2p on negative values',
  { 'data.csv': negative, 'p.yaml': protocolText(negative, { extra: 'preprocess: [log2p]' }) },
  'error: log2p got the negative value -2',
);
const huge = 'id,label,a,b\nr1,x,1.7e308,2\nr2,y,1.7e308,3\nr3,x,1.7e308,4\nr4,y,1.7e308,5\nr5,x,1,1\nr6,y,2,2\n';
runFails(
  'values beyond the safe range are refused before any fit',
  { 'data.csv': huge, 'p.yaml': protocolText(huge, { extra: 'preprocess: [standardize]' }) },
  /data.csv:2:6: error: cell "1.7e308" in column "a" \(row 1\) is outside the range foldseal computes with safely/,
);

t.test('a label value only in the test part is a warning and probability 0, never NaN', async (t) => {
  const rare = 'id,label,a\nr1,x,1\nr2,y,2\nr3,x,3\nr4,y,4\nr5,z,5\nr6,x,6\nr7,y,7\n';
  const dir = tempDir({ 'data.csv': rare, 'p.yaml': protocolText(rare, { split: 'split: {rule: kfold, folds: 2, seed: 1}' }) });
  const r = spawnCli(['run', 'p.yaml', '--out', 'res'], dir);
  t.equal(r.code, 0, r.stderr);
  t.match(r.stderr, /warning: class "z" has no row in the training part of repeat 1, fold \d; that fold's model gives it probability 0/);
  const text = readFileSync(join(dir, 'res', 'predictions.csv'), 'utf8') + readFileSync(join(dir, 'res', 'results.json'), 'utf8');
  t.notMatch(text, /NaN|Infinity/);
});
