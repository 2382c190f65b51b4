/**
 * The tested command-model examples (docs/command-models.md): examples/models/forest.py
 * (scikit-learn's random forest, Debian's python3-sklearn) and examples/models/glmnet.R (R's
 * glmnet, Debian's r-cran-glmnet), each run by foldseal and compared with a by-hand run of the same
 * script on the folds `foldseal folds` exports, made from the document alone
 * (test/reference/command_by_hand.py). Run by `npm run test:external` (CI runs it after `npm test`).
 */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import t from 'tap';
import { cli, debianPython, debianR, referenceTable, root, sha256, tempDir } from '../helpers.js';

const data = referenceTable('iris.csv').csv;

// The tested examples, each against a by-hand run of the same script on the exported folds.
const python = debianPython('sklearn');
const rGlmnet = debianR('glmnet');
const examples = [
  {
    name: 'the Python example (scikit-learn random forest)',
    script: 'forest.py',
    run: ['/usr/bin/python3', 'forest.py'],
    options: { trees: 25 },
    reported: 'scikit-learn',
    skip: python ? false : "Debian's python3-sklearn is not installed",
  },
  {
    name: 'the R example (glmnet elastic net)',
    script: 'glmnet.R',
    run: ['Rscript', 'glmnet.R'],
    options: { alpha: 0.5, lambda: 0.01 },
    reported: 'glmnet',
    skip: rGlmnet ? false : "R's glmnet is not installed (Debian r-cran-glmnet); .ci/run installs it",
  },
];
for (const ex of examples) {
  t.test(`${ex.name} equals its by-hand run on the exported folds`, { skip: ex.skip }, async (t) => {
    const script = readFileSync(join(root, 'examples', 'models', ex.script), 'utf8');
    const dir = tempDir({
      'iris.csv': data,
      [ex.script]: script,
      'p.yaml': [
        'foldseal: 1',
        'name: example',
        `data: {file: iris.csv, sha256: "${sha256(data)}", id: id, label: species}`,
        // A holdout half: one fit and one prediction per side keeps the suite quick.
        'split: {rule: holdout, test-fraction: 0.5, seed: 11}',
        'model:',
        '  kind: command',
        `  command: {run: ${JSON.stringify(ex.run)}, files: [{file: ${ex.script}, sha256: "${sha256(script)}"}]}`,
        `  options: ${JSON.stringify(ex.options)}`,
        'metrics: [accuracy, log-loss]',
      ].join('\n'),
    });
    // (verify and apply run the program through the same code as the JavaScript model above.)
    const r = await cli(['run', 'p.yaml', '--out', 'res', '--allow-commands'], dir);
    t.equal(r.code, 0, r.stderr);
    t.equal((await cli(['folds', 'p.yaml', '--out', 'folds.csv'], dir)).code, 0);
    const hand = spawnSync(
      '/usr/bin/python3',
      [
        join(root, 'test', 'reference', 'command_by_hand.py'),
        'iris.csv',
        'folds.csv',
        'species',
        '11',
        JSON.stringify(ex.options),
        '1',
        ...ex.run,
      ],
      { cwd: dir, encoding: 'utf8' },
    );
    t.equal(hand.status, 0, hand.stderr);
    const byHand = JSON.parse(hand.stdout) as Record<string, number[]>;
    const lines = readFileSync(join(dir, 'res', 'predictions.csv'), 'utf8')
      .trimEnd()
      .split('\n')
      .slice(1);
    t.equal(lines.length, 75, 'the holdout half');
    t.equal(Object.keys(byHand).length, 75);
    let worst = 0;
    for (const l of lines) {
      const c = l.split(',');
      const ref = byHand[`${c[1]}/${c[0]}`];
      for (let j = 0; j < 3; j++) worst = Math.max(worst, Math.abs(Number(c[5 + j]) - ref[j]));
    }
    t.equal(worst, 0, 'the same probabilities, bit for bit');
    const results = JSON.parse(readFileSync(join(dir, 'res', 'results.json'), 'utf8'));
    t.ok(results.model.command.versions[0][ex.reported], 'the program reported its runtime versions');
    t.ok(results.summary.accuracy.mean > 0.85, `accuracy ${results.summary.accuracy.mean}`);
  });
}
