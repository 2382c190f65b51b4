// predictions.csv written cell by cell into bytes must be exactly the text its format describes
// (docs/outputs: id, repeat, fold, truth, predicted, one probability per class; RFC 4180 quoting;
// numbers as String(v)), built here the plain way with strings, for ids and classes that need
// quotes or are not ASCII, and whatever the size of the pieces it comes in.
import { join } from 'node:path';
import fc from 'fast-check';
import t from 'tap';
import { validateProtocol } from '../../src/io/validate.js';
import { predictionsCsv, predictionsPieces } from '../../src/run/predictions.js';
import { runProtocol } from '../../src/run/run.js';
import { idOrder } from '../../src/split/key.js';
import { sha256, tempDir } from '../helpers.js';

const ids = ['b,1', 'é2', '"q"', 'a 4', 'a5', 'z6', '10', '9', 'x9', 'y10', 'w11', 'v12'];
const quote = (s: string) => (/[",]/.test(s) ? `"${s.replaceAll('"', '""')}"` : s);
const data = `id,x,label\n${ids.map((id, i) => `${quote(id)},${(i * 7) % 5},${quote(i % 3 === 0 ? 'yes, sure' : 'nö')}`).join('\n')}\n`;

t.test('predictions.csv, bytes written cell by cell, is the plain text of its format', async (t) => {
  const dir = tempDir({
    'd.csv': data,
    'p.yaml':
      `foldseal: 1\nname: quoting\ndata: {file: d.csv, sha256: "${sha256(data)}", id: id, label: label}\n` +
      'split: {rule: stratified-kfold, folds: 2, repeats: 2, seed: 3}\nmodel: {kind: gaussian-nb}\nmetrics: [accuracy]\n',
  });
  const r = await validateProtocol(join(dir, 'p.yaml'));
  t.same(
    r.problems.filter((p) => p.severity === 'error'),
    [],
  );
  const table = r.table!;
  const { cv } = runProtocol({
    protocol: r.protocol!,
    raw: r.raw,
    protocolFile: 'p.yaml',
    table,
    dataSha256: r.dataSha256!,
    assignment: r.assignment!,
    warnings: [],
  });
  const cell = (s: string) => (/[",\r\n]/.test(s) || s !== s.trim() ? `"${s.replaceAll('"', '""')}"` : s);
  const k = cv.classes.length;
  let expected = `${['id', 'repeat', 'fold', 'truth', 'predicted', ...cv.classes.map((c) => `p_${c}`)].map(cell).join(',')}\n`;
  cv.oof.forEach((proba, r) => {
    for (const row of idOrder(table.ids)) {
      const p = Array.from(proba.subarray(row * k, row * k + k));
      const best = p.indexOf(Math.max(...p));
      const line = [
        cell(table.ids[row]),
        r + 1,
        cv.testedIn[r][row],
        cell(cv.classes[table.y[row]]),
        cell(cv.classes[best]),
        ...p.map(String),
      ];
      expected += `${line.join(',')}\n`;
    }
  });
  t.equal(Buffer.from(predictionsCsv(cv, table)).toString('utf8'), expected, 'the whole file');
  t.match(expected, /"b,1",1,/, 'an id with a comma is quoted');
  t.match(expected, /"""q""",/, 'an id with quotes is quoted, its quotes doubled');
  fc.assert(
    fc.property(fc.integer({ min: 1, max: 200 }), (piece) => {
      // Each piece copied as it comes (the next one overwrites it).
      const joined = Buffer.concat(Array.from(predictionsPieces(cv, table, piece), (b) => Buffer.from(b)));
      return joined.toString('utf8') === expected;
    }),
  );
});
