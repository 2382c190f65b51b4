/** Imported first by every worker entry: puts back the V8 flags the process chose (heap-flags.ts). */
import { setFlagsFromString } from 'node:v8';
import { workerData } from 'node:worker_threads';

const flags = (workerData as { heapFlags?: string } | null)?.heapFlags;
if (flags !== undefined) setFlagsFromString(flags);
