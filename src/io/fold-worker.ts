/** Worker thread entry: fits the folds it is sent on the shared table (see fold-workers.ts). */
import { parentPort, workerData } from 'node:worker_threads';
import { FitError } from '../model/types.js';
import { fitFold, fitModelAfterPipeline, type FoldData } from '../run/fit-fold.js';
import type { FittedPipeline } from '../preprocess/pipeline.js';

const w = workerData as {
  protocol: Parameters<typeof fitFold>[0];
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

parentPort!.on('message', (job: { index: number; train: Int32Array; test: Int32Array; pipeline?: FittedPipeline }) => {
  try {
    const fit = job.pipeline
      ? fitModelAfterPipeline(w.protocol, table, job.pipeline, job.train, job.test)
      : fitFold(w.protocol, table, job.train, job.test);
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
