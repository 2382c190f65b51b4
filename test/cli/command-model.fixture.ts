/**
 * A small command model for the tests, written in JavaScript so that a test costs milliseconds:
 * nearest class means with a softmax of negative squared distances, following the contract of
 * docs/command-models.md. `options.behave` makes it misbehave in the ways the bad-input tests need.
 */
export const CENTROID_MODEL = String.raw`
const fs = require('node:fs');
const path = require('node:path');
const [mode, dir] = process.argv.slice(2);
const request = JSON.parse(fs.readFileSync(path.join(dir, 'request.json'), 'utf8'));
const behave = request.options.behave ?? 'well';
const table = (name) => fs.readFileSync(path.join(dir, name), 'utf8').trimEnd().split('\n').map((l) => l.split(','));
if (behave === 'exit-3' && mode === 'fit') { process.stderr.write('loading…\nno convergence in fold ' + request.fold + '\n'); process.exit(3); }
if (behave === 'sleep') { const until = Date.now() + 20000; while (Date.now() < until); }
if (behave === 'touch-file' && mode === 'fit') fs.appendFileSync(path.join(process.cwd(), 'model.js'), '\n// changed\n');
if (mode === 'fit') {
  const [head, ...rows] = table('train.csv');
  const k = request.classes.length, d = head.length - 2;
  const sum = Array.from({ length: k }, () => new Array(d).fill(0)), n = new Array(k).fill(0);
  for (const r of rows) { const c = request.classes.indexOf(r[1]); n[c]++; for (let j = 0; j < d; j++) sum[c][j] += Number(r[j + 2]); }
  if (behave !== 'empty-model') {
    const means = sum.map((s, c) => s.map((v) => (n[c] ? v / n[c] : 0)));
    fs.writeFileSync(path.join(dir, 'model', 'means.json'), JSON.stringify({ means, seed: request.seed }));
    fs.writeFileSync(path.join(dir, 'model', 'versions.json'), JSON.stringify({ node: process.version }));
  }
} else {
  const { means } = JSON.parse(fs.readFileSync(path.join(dir, 'model', 'means.json'), 'utf8'));
  const [, ...rows] = table('rows.csv');
  if (behave === 'no-output') process.exit(0);
  const out = ['id,' + request.classes.map((c) => 'p_' + c).join(',')];
  for (const r of rows) {
    const s = means.map((m) => -m.reduce((a, v, j) => a + (Number(r[j + 1]) - v) ** 2, 0));
    const top = Math.max(...s), e = s.map((v) => Math.exp(v - top)), z = e.reduce((a, b) => a + b, 0);
    out.push(r[0] + ',' + e.map((v) => (behave === 'bad-sum' ? (v / z) * 0.99 : v / z)).join(','));
  }
  if (behave === 'partial') out.pop();
  if (behave === 'malformed') out[1] = out[1].replace(',', ';');
  fs.writeFileSync(path.join(dir, 'proba.csv'), out.join('\n') + '\n');
}
`;
