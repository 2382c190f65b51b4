// The shell of the streamed read (src/io/streamed-read.ts, src/io/file-identity.ts) on real
// files: it builds the table the whole-file reader builds, leaves what it should to that reader,
// and stops when the file changes under it — the hash and the rows must come from one file.
// Reference: tableFromBytes on the same bytes (plain.part.ts holds it to RFC 4180).
import { createHash } from 'node:crypto';
import { appendFileSync, closeSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import t from 'tap';
import { fdReader, openIdentified, reopen, type FileIdentity } from '../../src/io/file-identity.js';
import { startRowThread } from '../../src/io/row-helper.js';
import { indexLines, readStreamed, type StreamTwin } from '../../src/io/streamed-read.js';
import { FoldsealError } from '../../src/problems/problem.js';
import { tableFromBytes } from '../../src/table/load.js';
import { extractStretches, stretchStarts } from '../../src/table/streamed-grid.js';
import type { DataRoles } from '../../src/table/table.js';
import { referenceTable, tempDir } from '../helpers.js';

const where = () => undefined;
const roles: DataRoles = { id: 'id', label: 'diagnosis', missing: ['NA'], keepOtherColumns: true };
const { csv } = referenceTable('breast-cancer.csv');

/** The other thread's work done here, with `meddle` run when the hash is asked for. */
function twinHere(meddle = () => {}, hashed = () => {}): StreamTwin {
  return {
    stretchHelper: (path, identity, ix, shownAs) => ({
      sha256: () => {
        hashed();
        meddle();
        return createHash('sha256').update(readFileSync(path)).digest('hex');
      },
      numbers: (n) => new Float64Array(n),
      claims: (n) => new Int32Array(n),
      start: (numberCols, textCols, claims, numbers) => {
        const fd = reopen(path, identity, shownAs);
        const part = extractStretches(ix, numberCols, textCols, claims, numbers, fdReader(fd, shownAs));
        closeSync(fd);
        return () => part;
      },
    }),
  };
}

/** The code of the problem `f` throws, if it throws one. */
function thrownCode(f: () => unknown): string | undefined {
  try {
    f();
  } catch (e) {
    return e instanceof FoldsealError ? e.problems[0].code : String(e);
  }
  return undefined;
}

const read = (path: string, twin: StreamTwin) => readStreamed(path, 'bc.csv', 0x2c, roles, where, twin, () => {});

t.test('a real file read in stretches gives the whole-file table and hash', async (t) => {
  const dir = tempDir({ 'bc.csv': csv });
  const got = read(join(dir, 'bc.csv'), twinHere())!;
  const whole = tableFromBytes(Buffer.from(csv), 'bc.csv', roles, undefined, where);
  t.equal(got.sha256, createHash('sha256').update(csv).digest('hex'));
  t.same(got.built.table, whole.table);
  t.same(got.built.problems, whole.problems);
  t.same(got.built.described?.featureCell(568, 3), whole.described?.featureCell(568, 3), 'a cell placed after the read');
});

t.test('files left to the whole-file reader', async (t) => {
  const dir = tempDir({ 'q.csv': 'id,diagnosis,x\n"a",b,1\n', 'r.csv': 'id,diagnosis,x\na,b,1\nc,d\n', 'e.csv': '' });
  writeFileSync(join(dir, 'g.csv'), gzipSync(csv));
  let hashed = 0;
  const counting = twinHere(
    () => {},
    () => hashed++,
  );
  t.equal(read(join(dir, 'q.csv'), counting), undefined, 'a quote');
  t.equal(read(join(dir, 'r.csv'), counting), undefined, 'ragged rows');
  t.equal(hashed, 1, 'the ragged file was hashed after its rows; the quote showed in the first stretch, before any hash');
  t.equal(read(join(dir, 'g.csv'), counting), undefined, 'gzip');
  t.equal(read(join(dir, 'e.csv'), counting), undefined, 'an empty file');
  t.equal(hashed, 1, 'a compressed or empty file is not hashed twice');
  t.equal(read(join(dir, 'missing.csv'), counting), undefined, 'no file');
  t.equal(read(dir, counting), undefined, 'a folder');
});

t.test('a file that changes during the read stops it', async (t) => {
  // Over a megabyte (the stretch single cells are read in): the last row's cell needs a read of its own.
  const [head, ...body] = csv.trimEnd().split('\n');
  const big = `${head}\n${Array.from({ length: 12 }, (_, k) => body.map((l) => `${k}-${l}`).join('\n')).join('\n')}\n`;
  const dir = tempDir({ 'bc.csv': big });
  const path = join(dir, 'bc.csv');
  t.equal(
    thrownCode(() =>
      read(
        path,
        twinHere(() => appendFileSync(path, 'x')),
      ),
    ),
    'data-changed-while-read',
  );
  writeFileSync(path, big);
  const got = read(path, twinHere())!;
  t.equal(got.built.table?.ids.length, 12 * 569);
  // Replaced after the read: a cell placed later is refused rather than read from another file.
  writeFileSync(join(dir, 'other.csv'), big.replace('mean_radius', 'mean_radiu5'));
  renameSync(join(dir, 'other.csv'), path);
  t.equal(
    thrownCode(() => got.built.described!.featureCell(12 * 569 - 1, 0)),
    'data-changed-while-read',
  );
});

t.test('the row thread hashes and parses from the file, and refuses another file', async (t) => {
  const dir = tempDir({ 'bc.csv': csv });
  const path = join(dir, 'bc.csv');
  const opened = openIdentified(path)!;
  const ix = indexLines(opened.fd, opened.identity.size, 0x2c, 'bc.csv')!;
  closeSync(opened.fd);
  const thread = startRowThread();
  try {
    t.equal(thread.stretchHelper(path, opened.identity, ix, 'bc.csv').sha256(), createHash('sha256').update(csv).digest('hex'));
    const other: FileIdentity = { ...opened.identity, mtimeMs: opened.identity.mtimeMs + 1 };
    t.equal(thread.stretchHelper(path, other, ix, 'bc.csv').sha256(), undefined, 'another modification time: not the file indexed');
    const helper = thread.stretchHelper(path, other, ix, 'bc.csv');
    const claims = () => ({ starts: stretchStarts(ix, 1000, helper.claims), taken: helper.claims(1) });
    const wait = helper.start([1], [0], claims(), helper.numbers(ix.rows));
    t.equal(thrownCode(wait), 'data-changed-while-read');
    const shrunk = tempDir({ 'bc.csv': csv.slice(0, 1000) });
    const small = openIdentified(join(shrunk, 'bc.csv'))!;
    closeSync(small.fd);
    const cut = thread.stretchHelper(join(shrunk, 'bc.csv'), small.identity, ix, 'bc.csv');
    t.equal(thrownCode(cut.start([1], [0], claims(), cut.numbers(ix.rows))), 'data-changed-while-read', 'rows past the end of the file');
  } finally {
    await thread.close();
  }
});

t.test('without the other thread the index pass hashes the file', async (t) => {
  const dir = tempDir({ 'bc.csv': csv });
  const got = readStreamed(join(dir, 'bc.csv'), 'bc.csv', 0x2c, roles, where, undefined, () => {})!;
  t.equal(got.sha256, createHash('sha256').update(csv).digest('hex'));
  t.same(got.built.table, tableFromBytes(Buffer.from(csv), 'bc.csv', roles, undefined, where).table);
  // Stretches of 100 bytes: most lines span two, and the hash still covers every byte once.
  const opened = openIdentified(join(dir, 'bc.csv'))!;
  const hash = createHash('sha256');
  const ix = indexLines(opened.fd, opened.identity.size, 0x2c, 'bc.csv', { hash, limit: 100 });
  closeSync(opened.fd);
  t.equal(ix?.rows, 569);
  t.equal(hash.digest('hex'), got.sha256);
});
