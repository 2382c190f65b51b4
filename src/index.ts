/** foldseal's library surface. Re-exports only. */
export * from './problems/index.js';
export { parseProtocol, type ParsedProtocol } from './protocol/parse.js';
export type * from './protocol/types.js';
export { loadProtocol, validateProtocol, type ValidationReport } from './io/validate.js';
export { sha256File, sha256Bytes } from './io/hash.js';
export { readDelimited } from './table/delimited.js';
export { buildTable, type Table } from './table/table.js';
export type { Matrix } from './table/matrix.js';
export { assignFolds } from './split/assign.js';
export { SPLIT_VERSION, type Assignment } from './split/assignment.js';
export { assignmentCsv } from './split/csv.js';
export { deriveKeys, keyMessage } from './split/key.js';
export { parsePinned } from './split/pinned.js';
