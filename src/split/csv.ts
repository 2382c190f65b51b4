/** The assignment CSV (`id,repeat,fold`), sorted by repeat then id byte order (spec §6). */
import { csvCells } from '../table/csv-write.js';
import { ByteBuilder } from '../util/byte-builder.js';
import type { Assignment } from './assignment.js';
import { idOrder } from './key.js';

export function assignmentCsv(a: Assignment): string {
  const bytes = assignmentCsvBytes(a);
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.length).toString('utf8');
}

/** The file as UTF-8 bytes, written row by row without a string per row (a million-row run hashes it as it is). */
export function assignmentCsvBytes(a: Assignment): Uint8Array {
  const order = idOrder(a.ids);
  const n = a.ids.length;
  const out = new ByteBuilder(n * a.repeats * 14 + 64);
  out.text('id,repeat,fold\n');
  const quoted = csvCells(a.ids);
  for (let r = 1; r <= a.repeats; r++) {
    const base = (r - 1) * n;
    for (let k = 0; k < n; k++) {
      const row = order[k];
      out.text(quoted[row]);
      out.byte(0x2c);
      out.int(r);
      out.byte(0x2c);
      out.int(a.fold[base + row]);
      out.byte(0x0a);
    }
  }
  return out.result();
}
