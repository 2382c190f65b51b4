// The text of a generated delimited file, shared by the fast readers' property tests (plain.part.ts,
// streamed.part.ts): a header, rows of an id, a label and three numbers, one row perhaps a cell
// short (`ragged`) or a cell long (`ragged` − 10), perhaps a blank line inside, a byte-order
// mark, any line ending and trailing line breaks; and a read table in a form `t.same` compares
// exactly (−0 and NaN spelled out).
import type { TableResult } from '../../src/table/table.js';

export interface GeneratedFile {
  rows: [string, string, string[]][];
  eol: string;
  bom: boolean;
  trailing: string;
  ragged: number;
  blankInside: boolean;
}

export function generatedText(f: GeneratedFile): string {
  const lines = [
    'id,label,a,b,c',
    ...f.rows.map(([id, label, xs], r) =>
      [id, label, ...(r === f.ragged ? xs.slice(1) : r === f.ragged - 10 ? [...xs, '1'] : xs)].join(','),
    ),
  ];
  if (f.blankInside && lines.length > 2) lines.splice(2, 0, '');
  return (f.bom ? '\ufeff' : '') + lines.join(f.eol) + f.trailing;
}

export function comparable(r: TableResult) {
  const tb = r.table;
  return {
    problems: r.problems.map((p) => [p.severity, p.code, p.message, p.position]),
    table: tb && {
      ...tb,
      X: { ...tb.X, data: Array.from(tb.X.data, (v) => (Object.is(v, -0) ? '-0' : Number.isNaN(v) ? 'NaN' : v)) },
      y: Array.from(tb.y),
      rowLines: Array.from(tb.rowLines),
    },
  };
}
