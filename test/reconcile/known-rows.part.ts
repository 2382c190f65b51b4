// models.json's known-rows written from two lists must be exactly what JSON.stringify writes for
// the id → digest object (ECMA-262's own-key order, §10.1.11.1 OrdinaryOwnPropertyKeys: array
// indices ascending, then other strings in insertion order), so runs stay byte-identical.
import fc from 'fast-check';
import t from 'tap';
import { KnownRowList, knownRows } from '../../src/reconcile/known-ids.js';
import { modelsJson, modelsJsonBytes, modelsJsonPieces, type ModelsFile } from '../../src/reconcile/models-file.js';

const tricky = [
  'b',
  '10',
  '2',
  '0',
  '01',
  '4294967294',
  '4294967295',
  '-1',
  '1.0',
  '1e3',
  ' 3',
  'é',
  '"q"',
  'a\\b',
  '9007199254740993',
  '',
  // On a plain object this key set the prototype and the row vanished from known-rows.
  '__proto__',
];

t.test('known rows from lists serialize as the object does', async (t) => {
  const X = { rows: tricky.length, cols: 2, data: Float64Array.from({ length: tricky.length * 2 }, (_, i) => i * 0.5 - 3) };
  const names = ['x', 'y'];
  const object = knownRows(tricky, X, names);
  const list = KnownRowList.of(tricky, X, names);
  t.equal(list.json(), JSON.stringify(object), 'tricky ids');
  t.ok(Object.hasOwn(JSON.parse(list.json()), '__proto__'), 'an id "__proto__" is kept');
  const file = { 'foldseal-models': 1, folds: [], 'known-rows': object } as unknown as ModelsFile;
  t.equal(modelsJson({ ...file, 'known-rows': list }), modelsJson(file), 'inside models.json');
  // Not the last key: still the same text.
  const { 'known-rows': _, ...rest } = file;
  const first = { 'known-rows': list, ...rest } as unknown as ModelsFile;
  t.equal(modelsJson(first), JSON.stringify({ 'known-rows': object, ...rest }) + '\n', 'known-rows not last');
  fc.assert(
    fc.property(fc.uniqueArray(fc.oneof(fc.string(), fc.nat().map(String)), { maxLength: 30 }), (ids) => {
      const m = { rows: ids.length, cols: 1, data: Float64Array.from(ids, (_, i) => i) };
      return KnownRowList.of(ids, m, ['v']).json() === JSON.stringify(knownRows(ids, m, ['v']));
    }),
  );
  // Any UTF-16 text, lone surrogates and control characters included (JSON.stringify escapes
  // them), between a text before and after: the bytes are that text's UTF-8.
  fc.assert(
    fc.property(fc.uniqueArray(fc.string({ unit: 'binary' }), { maxLength: 30 }), fc.string({ unit: 'grapheme' }), (ids, around) => {
      const m = { rows: ids.length, cols: 1, data: Float64Array.from(ids, (_, i) => i / 3) };
      const bytes = KnownRowList.of(ids, m, ['v']).bytes(around, `${around}\n`);
      return Buffer.from(bytes).equals(Buffer.from(`${around}${JSON.stringify(knownRows(ids, m, ['v']))}${around}\n`));
    }),
  );
  // In pieces of any size (each a view valid until the next), joined: the same bytes.
  fc.assert(
    fc.property(fc.uniqueArray(fc.string({ unit: 'binary' }), { maxLength: 30 }), fc.integer({ min: 1, max: 64 }), (ids, piece) => {
      const m = { rows: ids.length, cols: 1, data: Float64Array.from(ids, (_, i) => i / 7) };
      const file = { 'foldseal-models': 2, folds: [], 'known-rows': KnownRowList.of(ids, m, ['v']) } as unknown as ModelsFile;
      // Each piece copied as it comes (the next one overwrites it).
      const joined = Buffer.concat(Array.from(modelsJsonPieces(file, piece), (b) => Buffer.from(b)));
      return (
        joined.equals(Buffer.from(modelsJsonBytes(file))) &&
        joined.toString('utf8') === modelsJson({ ...file, 'known-rows': knownRows(ids, m, ['v']) })
      );
    }),
  );
  // Ids that escape to six times their length outgrow the first buffer: it grows, the text is the same.
  const escapes = Array.from({ length: 200 }, (_, i) => '\u0001'.repeat(i + 1));
  const m = { rows: escapes.length, cols: 1, data: Float64Array.from(escapes, (_, i) => i) };
  t.equal(KnownRowList.of(escapes, m, ['v']).json(), JSON.stringify(knownRows(escapes, m, ['v'])), 'ids of control characters');
});
