/** What validating a protocol against its data yields: the parse, the table, the assignment and the problems. Types only. */
import type { Assignment } from '../split/assignment.js';
import type { NewRows } from '../table/new-rows.js';
import type { Table } from '../table/table.js';
import type { Described } from '../table/covariates.js';
import type { ParsedProtocol } from './parse.js';

export interface ValidationReport extends ParsedProtocol {
  /** True when the protocol file itself could not be read (a usage-level failure). */
  unreadable?: boolean;
  table?: Table;
  dataSha256?: string;
  /** Samples a sample-sheet join left out (data.samples.unmatched: drop). */
  joined?: { 'data-only': number; 'sheet-only': number };
  /** Rows before and after data.where. */
  filtered?: { before: number; after: number };
  assignment?: Assignment;
  newRows?: NewRows;
  /** The non-feature columns and cell positions (ValidateOptions.describe). */
  described?: Described;
  /** Absolute paths of the files the protocol names. */
  paths?: { data: string; samples?: string; pinned?: string; newRows?: string };
}
