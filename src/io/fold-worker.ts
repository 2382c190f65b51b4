/** Worker thread entry: fits the fold jobs it claims on the shared table (see fold-workers.ts, fold-jobs.ts). */
import './worker-start.js';
import { parentPort, workerData } from 'node:worker_threads';
import { fitClaimedJobs, type FoldThreadData } from './fold-jobs.js';

fitClaimedJobs(workerData as FoldThreadData, (message, transfer) => parentPort!.postMessage(message, transfer));
