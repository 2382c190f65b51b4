/** The assignment CSV (`id,repeat,fold`), sorted by repeat then id byte order (spec §6). */
import { csvCells, TextBuilder } from '../table/csv-write.js';
import type { Assignment } from './assignment.js';
import { idOrder } from './key.js';

export function assignmentCsv(a: Assignment): string {
  return assignmentCsvText(a).text();
}

/** The same file as UTF-8 bytes (a million-row run hashes it without a text copy). */
export function assignmentCsvBytes(a: Assignment): Uint8Array {
  return assignmentCsvText(a).utf8();
}

function assignmentCsvText(a: Assignment): TextBuilder {
  const order = idOrder(a.ids);
  const n = a.ids.length;
  const out = new TextBuilder();
  out.add('id,repeat,fold\n');
  const quoted = csvCells(a.ids);
  for (let r = 1; r <= a.repeats; r++) {
    const base = (r - 1) * n;
    for (let k = 0; k < n; k++) {
      const row = order[k];
      out.add(`${quoted[row]},${r},${a.fold[base + row]}\n`);
    }
  }
  return out;
}
