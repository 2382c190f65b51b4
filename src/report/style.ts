/** The report's stylesheet: foldseal's own layout (a narrow reading column, numbered sections, tabular figures) and a print style. */
import { PALETTE } from './plots.js';

export const STYLE = `
:root { --ink: ${PALETTE.ink}; --teal: ${PALETTE.teal}; --amber: ${PALETTE.amber}; --rule: #d5dbde; --wash: #f3f6f7; }
* { box-sizing: border-box; }
body { margin: 0; color: var(--ink); background: #fff; font: 15px/1.5 Georgia, 'Times New Roman', serif; }
main { max-width: 62rem; margin: 0 auto; padding: 2rem 1.5rem 4rem; counter-reset: section; }
header.top { border-bottom: 3px solid var(--teal); padding-bottom: .75rem; margin-bottom: 1.5rem; }
header.top .kicker { font: 600 12px/1.2 Helvetica, Arial, sans-serif; letter-spacing: .12em; text-transform: uppercase; color: var(--teal); }
h1 { font-size: 1.7rem; margin: .2rem 0; }
h2 { font: 700 1.05rem/1.3 Helvetica, Arial, sans-serif; margin: 2.2rem 0 .6rem; counter-increment: section; border-top: 1px solid var(--rule); padding-top: .8rem; }
h2::before { content: counter(section) "  "; color: var(--teal); }
table { border-collapse: collapse; font: 13px/1.4 Helvetica, Arial, sans-serif; font-variant-numeric: tabular-nums; margin: .4rem 0 1rem; }
th, td { padding: .25rem .6rem; border-bottom: 1px solid var(--rule); text-align: right; }
th:first-child, td:first-child { text-align: left; }
thead th { border-bottom: 2px solid var(--ink); }
code, pre, .hash { font: 12px/1.45 'DejaVu Sans Mono', Menlo, Consolas, monospace; }
.hash { word-break: break-all; }
pre { background: var(--wash); padding: .8rem 1rem; overflow-x: auto; border-left: 3px solid var(--teal); }
.methods { background: var(--wash); padding: 1rem 1.2rem; border-left: 3px solid var(--amber); }
.caution { border: 1px solid var(--amber); padding: .6rem 1rem; margin: 1rem 0; font-size: 14px; }
.figures { display: flex; flex-wrap: wrap; gap: 1.5rem; }
figure { margin: 0; flex: 0 0 auto; }
figure svg { display: block; max-width: 100%; height: auto; }
figcaption { font: 12px/1.4 Helvetica, Arial, sans-serif; max-width: 24rem; margin-top: .3rem; }
.note { font: 12px/1.4 Helvetica, Arial, sans-serif; color: #4f5b61; }
.warning { color: #8a4b00; font-weight: 600; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: .2rem 1rem; font: 13px/1.4 Helvetica, Arial, sans-serif; }
dl.facts dt { font-weight: 600; }
dl.facts dd { margin: 0; }
@media print {
  body { font-size: 11pt; }
  main { max-width: none; padding: 0; }
  h2 { break-after: avoid; }
  figure, table, .methods { break-inside: avoid; }
  pre { white-space: pre-wrap; }
  a { color: inherit; text-decoration: none; }
}
`;
