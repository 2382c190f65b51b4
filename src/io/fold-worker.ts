/** Worker thread entry: fits the folds it is sent on the shared table (see fold-workers.ts). */
import { parentPort, workerData } from 'node:worker_threads';
import { FitError } from '../model/types.js';
import type { FoldData } from '../run/fit-fold.js';
import { runJob, type FoldJob } from '../run/executor.js';

const w = workerData as {
  protocol: Parameters<typeof runJob>[0];
  rows: number;
  cols: number;
  data: SharedArrayBuffer;
  columns?: SharedArrayBuffer;
  y: SharedArrayBuffer;
  classes: string[];
  featureNames: string[];
};
const table: FoldData = {
  X: { rows: w.rows, cols: w.cols, data: new Float64Array(w.data) },
  y: new Int32Array(w.y),
  classes: w.classes,
  featureNames: w.featureNames,
  columns: w.columns && new Float64Array(w.columns),
};

parentPort!.on('message', (job: FoldJob) => {
  try {
    const fit = runJob(w.protocol, table, job);
    parentPort!.postMessage({ index: job.index, fit }, [fit.proba.buffer as ArrayBuffer]);
  } catch (e) {
    const user = e instanceof FitError;
    parentPort!.postMessage({
      index: job.index,
      error: {
        kind: user ? e.name : 'bug',
        code: user ? e.code : '',
        message: user ? e.message : String((e as Error).stack ?? e),
        hint: user ? e.hint : undefined,
      },
    });
  }
});
