/**
 * The fold threads of `run` (src/io/fold-workers.ts, src/io/fold-worker.ts) on scikit-learn's
 * bundled breast-cancer table: folds fitted on worker threads only, on workers and this thread
 * together (the default), and on this thread alone give the same probabilities and models, bit
 * for bit; a fit error on a worker is reported for its repeat and fold. The workers are real:
 * the tests run compiled JavaScript.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import t, { type Test } from 'tap';
import { crossValidateInWorkers } from '../../src/io/fold-workers.js';
import { validateProtocol } from '../../src/io/validate.js';
import { crossValidate, type CvResult } from '../../src/run/cross-validate.js';
import { root, sha256, tempDir } from '../helpers.js';

const csv = readFileSync(join(root, 'test/reference/data/breast-cancer.csv'), 'utf8');

async function read(model: string, preprocess = '[standardize]') {
  const dir = tempDir({
    'bc.csv': csv,
    'p.yaml':
      `foldseal: 1\nname: fold-threads\ndata: {file: bc.csv, sha256: "${sha256(csv)}", id: id, label: diagnosis}\n` +
      `split: {rule: stratified-kfold, folds: 5, seed: 3}\npreprocess: ${preprocess}\nmodel: ${model}\n` +
      'metrics: [accuracy, log-loss]\n',
  });
  const report = await validateProtocol(join(dir, 'p.yaml'));
  return { p: report.protocol!, table: report.table!, a: report.assignment! };
}

const same = (t: Test, a: CvResult, b: CvResult, what: string) => {
  const bits = (r: CvResult) => r.oof.map((o) => Buffer.from(o.buffer, o.byteOffset, o.byteLength).toString('hex'));
  t.same(bits(a), bits(b), `${what}: out-of-fold probabilities, bit for bit`);
  t.equal(JSON.stringify(a.models), JSON.stringify(b.models), `${what}: fold models`);
};

/** With FOLDSEAL_THREADS set for the call only. */
async function threads<T>(n: string, f: () => Promise<T>): Promise<T> {
  const before = process.env.FOLDSEAL_THREADS;
  process.env.FOLDSEAL_THREADS = n;
  try {
    return await f();
  } finally {
    if (before === undefined) delete process.env.FOLDSEAL_THREADS;
    else process.env.FOLDSEAL_THREADS = before;
  }
}

t.test('workers only, workers with this thread, and this thread alone agree', async (t) => {
  for (const [model, preprocess] of [
    ['{kind: logistic, options: {l2: 1}}', '[standardize]'],
    ['{kind: knn, options: {k: 5}}', '[{impute: {by: median}}, standardize]'],
  ]) {
    const { p, table, a } = await read(model, preprocess);
    const serial = crossValidate(p, table, a);
    let before = 0;
    const workersOnly = await threads('2', () => crossValidateInWorkers(p, table, a, {}, () => before++, { here: false }));
    const together = await threads('2', () => crossValidateInWorkers(p, table, a));
    t.equal(before, 1, 'the work for this thread ran once');
    same(t, workersOnly, serial, `${model}: two workers`);
    same(t, together, serial, `${model}: a worker and this thread`);
  }
});

t.test('a fit error on a worker names its repeat and fold', async (t) => {
  // Standardized features are negative: multinomial naive Bayes refuses them.
  const { p, table, a } = await read('{kind: multinomial-nb}', '[{impute: {by: median}}, standardize]');
  await t.rejects(
    threads('2', () => crossValidateInWorkers(p, table, a, {}, () => {}, { here: false })),
    /multinomial-nb needs non-negative counts.*\(repeat \d, fold \d\)/,
  );
});
