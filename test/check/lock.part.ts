// The lock is read with JSON.parse (RFC 8259), and findings are placed by a linear scan for their
// key path. Positions are checked by hand on small texts; a corrupt lock reports JSON.parse's own
// position as line and column.
import t from 'tap';
import { LOCK_VERSION, lockPosition, lockText, parseLock } from '../../src/check/lock.js';

const lock = {
  'foldseal-lock': LOCK_VERSION as typeof LOCK_VERSION,
  protocols: {
    'a.yaml': {
      name: 'a',
      'protocol-sha256': 'x',
      'data-sha256': 'y',
      'assignment-sha256': 'z',
      split: { rule: 'kfold', seed: 1, folds: 2, repeats: 1, assign: 'balanced', pinned: null },
      assignment: { 'r"1': '1', r2: '2' },
    },
    'b.yaml': {
      name: 'b',
      'protocol-sha256': 'x',
      'data-sha256': 'y',
      'assignment-sha256': 'z',
      split: { rule: 'kfold', seed: 1, folds: 2, repeats: 1, assign: 'balanced', pinned: null },
      assignment: {},
    },
  },
};

t.test('key paths are found line by line, after their parents', async (t) => {
  const text = lockText(lock);
  const lines = text.split('\n');
  const b = lockPosition(text, ['protocols', 'b.yaml'])!;
  t.equal(lines[b.line - 1].slice(b.col - 1), '"b.yaml": {');
  const id = lockPosition(text, ['protocols', 'a.yaml', 'assignment', 'r"1'])!;
  t.equal(lines[id.line - 1].slice(id.col - 1), '"r\\"1": "1",', 'a key with a quote');
  t.equal(lockPosition(text, ['protocols', 'c.yaml']), undefined);
  const parsed = parseLock(text, 'foldseal.lock.json');
  t.same(parsed.problems, []);
  t.same(parsed.lock, lock);
});

t.test('a corrupt lock: the position JSON.parse names, as line and column', async (t) => {
  const broken = '{\n  "foldseal-lock": 1,\n  "protocols": {,}\n}\n';
  const p = parseLock(broken, 'foldseal.lock.json').problems[0];
  t.equal(p.code, 'lock-corrupt');
  t.match(p.message, /^the lock is not valid JSON: /);
  t.same(p.position, { line: 3, col: 17 });
  t.equal(parseLock('[1]', 'l').problems[0].message, 'the lock is not a JSON object');
  t.match(parseLock('{"foldseal-lock": 2}', 'l').problems[0].message, /lock format 2 is not one this foldseal reads/);
});
