// Writes fixtures/compare-proc.json: pROC's DeLong paired test per repeat on the predictions of the
// two breast-cancer protocols of compare-protocols.mjs, with the SHA-256 of the predictions it was
// computed on (the test checks them, so a change in foldseal's predictions cannot pass silently).
// Needs the build and Rscript with pROC and jsonlite. Usage: node test/reference/make-compare-fixture.mjs
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { comparePair } from './compare-protocols.mjs';

const here = new URL('.', import.meta.url).pathname;
const bin = join(here, '..', '..', 'dist', 'src', 'cli', 'main.js');
const dir = mkdtempSync(join(tmpdir(), 'foldseal-compare-'));
const pair = comparePair();
const sha = {};
for (const side of ['a', 'b']) {
  writeFileSync(join(dir, `${side}.yaml`), pair[side]);
  execFileSync(process.execPath, [bin, 'run', join(dir, `${side}.yaml`), '--out', join(dir, side), '--allow-outside'], { stdio: 'ignore' });
  sha[side] = createHash('sha256')
    .update(readFileSync(join(dir, side, 'predictions.csv')))
    .digest('hex');
}
const out = join(dir, 'proc.json');
execFileSync('Rscript', [
  join(here, 'compare_reference.R'),
  join(dir, 'a', 'predictions.csv'),
  join(dir, 'b', 'predictions.csv'),
  'malignant',
  out,
]);
const fixture = {
  source: "R pROC roc.test(method = 'delong', paired = TRUE)",
  'predictions-sha256': sha,
  repeats: JSON.parse(readFileSync(out, 'utf8')),
};
writeFileSync(join(here, 'fixtures', 'compare-proc.json'), JSON.stringify(fixture, null, 2) + '\n');
console.log(JSON.stringify(fixture, null, 2));
