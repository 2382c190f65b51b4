// Two protocols on scikit-learn's bundled breast-cancer table (data/breast-cancer.csv), the same
// data and split, different pipelines: the pair the paired-comparison checks use. Shared by the
// fixture maker (make-compare-fixture.mjs) and the tests.
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';

const dataPath = join(new URL('.', import.meta.url).pathname, 'data', 'breast-cancer.csv');

export function comparePair() {
  const sha = createHash('sha256').update(readFileSync(dataPath)).digest('hex');
  const head =
    `foldseal: 1\ndata: {file: ${JSON.stringify(dataPath)}, sha256: "${sha}", id: id, label: diagnosis, positive: malignant}\n` +
    'split: {rule: stratified-kfold, folds: 5, repeats: 3, seed: 31}\nmetrics: [accuracy, roc-auc, log-loss, brier]\n';
  return {
    a: `${head}name: bc-gaussian-nb\nmodel: {kind: gaussian-nb}\n`,
    b: `${head}name: bc-logistic\npreprocess: [standardize, {select: {top: 1, by: f-test}}]\nmodel: {kind: logistic, options: {l2: 1}}\n`,
  };
}
