// The quick guess at a protocol's data file (used only to start the row thread early) against the
// YAML library's own reading of the same texts (the yaml package, YAML 1.2): it names the same file,
// or nothing.
import t from 'tap';
import { parse } from 'yaml';
import { dataSectionGuess } from '../../src/protocol/data-file-guess.js';

const dataFileGuess = (text: string) => dataSectionGuess(text)?.file;

const texts = [
  'foldseal: 1\nname: a\ndata: {file: a-100k-x50.csv, sha256: "ab", id: id, label: class}\nsplit: {rule: kfold}\n',
  'foldseal: 1\ndata:\n  id: id\n  file: tables/expr.csv\n  label: class\nsplit:\n  pinned: {file: folds.csv}\n',
  'data:\n  # the samples\n  file: "with space.csv"\n',
  "data: {label: y, file: 'single.tsv'}\n",
  'data: { file: "x.parquet" }\n',
  'data:\n  layout: features-in-rows\n  file: genes.tsv.gz   # gzip\n',
  'name: x\nsplit:\n  pinned:\n    file: folds.csv\ndata:\n  file: later.csv\n',
];

t.test('the guess names the file the YAML library reads as data.file', async (t) => {
  for (const text of texts)
    t.equal(dataFileGuess(text), (parse(text) as { data: { file: string } }).data.file, text.split('\n')[1] ?? text);
});

t.test('no guess where the text does not show one', async (t) => {
  t.equal(dataFileGuess('foldseal: 1\nname: x\n'), undefined, 'no data mapping');
  t.equal(dataFileGuess('data:\n  id: id\nsplit:\n  pinned: {file: folds.csv}\n'), undefined, "another mapping's file is not the data's");
  t.equal(dataFileGuess('data: {file: }\n'), undefined, 'an empty value');
  t.equal(dataFileGuess('data: {file: "esc\\"aped.csv"}\n'), undefined, 'a quoted name with escapes is left to the YAML library');
});

t.test('a data mapping read whole is told apart from a plain table read in stretches', async (t) => {
  t.equal(dataSectionGuess(texts[0])?.plain, true, 'flow style, roles only');
  t.equal(dataSectionGuess(texts[1])?.plain, true, 'block style, roles only');
  t.equal(dataSectionGuess('data: {file: d.csv, layout: samples-in-rows}\n')?.plain, true, 'the default layout named');
  t.equal(dataSectionGuess(texts[5])?.plain, false, 'features in rows');
  t.equal(dataSectionGuess('data:\n  file: m.tsv\n  samples: {file: s.csv, id: id}\n')?.plain, false, 'a sample sheet');
  t.equal(dataSectionGuess('data: {file: d.csv, where: {site: [a]}}\n')?.plain, false, 'a row filter');
  t.equal(dataSectionGuess('data: {file: d.csv, classes: {x: [a, b], y: [c]}}\n')?.plain, false, 'a class map');
});
