// V8's flags go back to node's own when a worker starts (Node 20): the CLI's heap flags are
// handed to foldseal's workers, which set them again first thing. A library caller that set none
// hands none on.
import { Worker } from 'node:worker_threads';
import t from 'tap';
import { heapFlagsForWorker, useHeapFlags } from '../../src/io/heap-flags.js';

const start = new URL('../../src/io/worker-start.js', import.meta.url);

function exitOf(workerData: unknown): Promise<number> {
  return new Promise((resolve, reject) => {
    const w = new Worker(start, { workerData });
    w.on('error', reject);
    w.on('exit', resolve);
  });
}

t.test('heap flags go to workers only once chosen', async (t) => {
  t.same(heapFlagsForWorker(), {}, 'none chosen: nothing for workers');
  t.equal(await exitOf({}), 0, 'a worker without flags starts');
  // The CLI's own choice (cli/main.ts); in this test process it only keeps the young generation small.
  useHeapFlags('--semi-space-growth-factor=1');
  t.same(heapFlagsForWorker(), { heapFlags: '--semi-space-growth-factor=1' }, 'chosen: handed on');
  t.equal(await exitOf(heapFlagsForWorker()), 0, 'a worker sets them again and runs');
  t.equal(await exitOf(null), 0, 'a worker started without workerData');
});

// On a large table a run collects its garbage between phases (V8 otherwise lets some 64 MB of
// dead typed arrays pile up first): with the command line's flags a collection happens, and
// below the size nothing is done.
t.test('collectGarbage collects with the command line flags, on a large table only', async (t) => {
  const { CLI_HEAP_FLAGS, COLLECT_FROM_CELLS, collectGarbage } = await import('../../src/io/heap-flags.js');
  t.ok(CLI_HEAP_FLAGS.split(' ').includes('--expose-gc'), 'the flags give the collector');
  useHeapFlags(CLI_HEAP_FLAGS);
  collectGarbage(COLLECT_FROM_CELLS - 1);
  let target: object | undefined = { big: new Float64Array(1024) };
  const ref = new WeakRef(target);
  target = undefined;
  // A WeakRef's target is kept to the end of the current job: let it end first.
  await new Promise((resolve) => setImmediate(resolve));
  collectGarbage(COLLECT_FROM_CELLS);
  await new Promise((resolve) => setImmediate(resolve));
  t.equal(ref.deref(), undefined, 'an object nothing holds is gone after a collection');
});
