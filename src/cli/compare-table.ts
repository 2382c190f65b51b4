/** The paired comparison for the terminal. */
import type { Comparison } from '../compare/paired.js';
import { textTable } from './text-table.js';

const fmt = (v: number) => v.toFixed(4);
const pFmt = (p: number | null) => (p === null ? '—' : p < 0.0001 ? p.toExponential(1) : p.toFixed(4));

export function compareText(c: Comparison): string {
  const pct = Math.round(c.level * 1e6) / 1e4;
  let out =
    `A: ${c.a.source} (${c.a.name})\nB: ${c.b.source} (${c.b.name})\n` +
    `paired: the same data (sha256 ${c['data-sha256'].slice(0, 12)}…) and the same folds (assignment ${c['assignment-sha256'].slice(0, 12)}…)\n\n`;
  out +=
    `per metric, over the folds (B − A; corrected resampled t-test, Nadeau & Bengio 2003):\n` +
    textTable(
      ['metric', 'better', 'A', 'B', 'B − A', `${pct} % interval`, 't', 'p', 'folds'],
      c.metrics.map((m) => [
        m.metric,
        m.better,
        fmt(m.a),
        fmt(m.b),
        fmt(m.difference),
        `${fmt(m.interval[0])} to ${fmt(m.interval[1])}`,
        m.t === null ? '—' : m.t.toFixed(2),
        pFmt(m.p),
        String(m.folds),
      ]),
    );
  out +=
    `\nMcNemar's exact test on the predicted classes (rows only one side got right):\n` +
    textTable(
      ['repeat', 'rows', 'only A right', 'only B right', 'both right', 'both wrong', 'p'],
      c.mcnemar.map((r) => [
        String(r.repeat),
        String(r.rows),
        String(r['only-a-right']),
        String(r['only-b-right']),
        String(r['both-right']),
        String(r['both-wrong']),
        pFmt(r.p),
      ]),
    );
  if (c.delong)
    out +=
      `\nDeLong's paired test of ROC AUC (pooled out-of-fold probabilities):\n` +
      textTable(
        ['repeat', 'AUC A', 'AUC B', 'B − A', 'z', 'p'],
        c.delong.map((r) => [String(r.repeat), fmt(r['auc-a']), fmt(r['auc-b']), fmt(r.difference), r.z.toFixed(2), pFmt(r.p)]),
      );
  for (const note of c.notes) out += `note: ${note}\n`;
  return `${out}\n${c.verdict.text}\n`;
}
