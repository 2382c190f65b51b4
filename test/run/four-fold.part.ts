/**
 * A hand-made 4-fold example (common practice: the reported score is the mean of the per-fold
 * accuracies). 1-nearest-neighbour on one feature; ties between equally near training rows go
 * to the earlier id in byte order, as the runner promises. Worked by hand:
 *   fold 1 tests r1 (→ a, right) and r5 (nearest r4 = a, wrong)                 → 0.5
 *   fold 2 tests r2 (r1/r3 tie, both a, right), r6 (r4 a / r7 b tie → r4, wrong) → 0.5
 *   fold 3 tests r4 (r5/r6 both b, wrong), r8 (nearest r3 = a, wrong)           → 0.0
 *   fold 4 tests r7 (nearest r6 = b, right), r3 (r2 a / r8 b tie → r2, right)    → 1.0
 * mean = 0.5, pooled = 4 / 8 = 0.5.
 */
import { join } from 'node:path';
import t from 'tap';
import { validateProtocol } from '../../src/io/validate.js';
import { runProtocol } from '../../src/run/run.js';
import { sha256, tempDir } from '../helpers.js';

const data = 'id,x,label\nr1,0,a\nr2,1,a\nr3,2,a\nr4,11,a\nr5,10,b\nr6,12,b\nr7,13,b\nr8,3,b\n';
const folds = 'id,repeat,fold\nr1,1,1\nr2,1,2\nr3,1,4\nr4,1,3\nr5,1,1\nr6,1,2\nr7,1,4\nr8,1,3\n';

t.test('mean of per-fold accuracies in a hand-made 4-fold example', async (t) => {
  const dir = tempDir({
    'd.csv': data,
    'f.csv': folds,
    'p.yaml':
      `foldseal: 1\nname: four\ndata: {file: d.csv, sha256: "${sha256(data)}", id: id, label: label}\nsplit: {pinned: ` +
      `{file: f.csv, sha256: "${sha256(folds)}"}}\nmodel: {kind: knn, options: {k: 1}}\nmetrics: [accuracy]\n`,
  });
  const r = await validateProtocol(join(dir, 'p.yaml'));
  t.same(r.problems, []);
  const input = {
    protocol: r.protocol!,
    raw: r.raw,
    protocolFile: 'p.yaml',
    table: r.table!,
    dataSha256: r.dataSha256!,
    assignment: r.assignment!,
    warnings: [],
  };
  const out = runProtocol(input);
  // A sink takes predictions.csv and models.json piece by piece: the same bytes and digests, and neither is kept.
  const taken: Record<string, Buffer[]> = {};
  const streamed = runProtocol(input, {}, undefined, undefined, (name, pieces) => {
    taken[name] = Array.from(pieces, (b) => Buffer.from(b));
    return sha256(Buffer.concat(taken[name]));
  });
  t.same(Object.keys(taken).sort(), ['models.json', 'predictions.csv'], 'both files went to the sink');
  t.ok(Buffer.concat(taken['predictions.csv']).equals(Buffer.from(out.predictions!)), 'predictions.csv: same bytes');
  t.ok(Buffer.concat(taken['models.json']).equals(Buffer.from(out.files['models.json']!)), 'models.json: same bytes');
  t.same(streamed.digests, out.digests, 'same digests');
  t.equal(streamed.files['models.json'], undefined, 'models.json not kept');
  t.equal(streamed.predictions, undefined, 'predictions.csv not kept');
  t.same(
    out.cv.folds.map((f) => f.metrics.accuracy),
    [0.5, 0.5, 0, 1],
  );
  t.equal(out.cv.summary.accuracy.mean, 0.5);
  t.equal(out.cv.summary.accuracy.pooled, 0.5);
  t.ok(Math.abs(out.cv.summary.accuracy.sd! - Math.sqrt((0 ** 2 + 0 + 0.25 + 0.25) / 3)) < 1e-15, 'SD with the n − 1 divisor');
});
