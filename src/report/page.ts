/** The report as one self-contained HTML page: no scripts, no fonts, no requests; every plot inline SVG. Pure. */
import { metrics as metricEntries, type MetricName } from '../metric/registry.js';
import type { Problem } from '../problems/problem.js';
import { confusion } from './curves.js';
import type { Plot } from './plots.js';
import type { OutOfFold } from './predictions.js';
import { featureStability } from './stability.js';
import { STYLE } from './style.js';

export interface AppliedRow {
  id: string;
  source: string;
  predicted: string;
  agreement: number;
}

export interface ReportInput {
  results: any;
  manifest: any;
  manifestSha256: string;
  protocolYaml: string;
  methods: string;
  oof: OutOfFold;
  models?: { folds: { repeat: number; fold: number; pipeline: { columns: string[] } }[] };
  applied?: AppliedRow[];
  signature: { status: 'valid' | 'unsigned' | 'invalid'; signedBy?: string; sshFingerprint?: string; pinned: boolean; problems: string[] };
  /** The audit's findings, or why it is not in the report. */
  audit: { findings: Problem[]; skipped: string[] } | { missing: string };
  figures: { plot: Plot; svg: string }[];
  toolVersion: string;
}

/** In every report's head: a results folder's report.html without it is the user's, and `run --force` leaves the folder alone. */
import { REPORT_MARK } from './mark.js';

export { REPORT_MARK };

export function escapeHtml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

const num = (v: number | null | undefined, d = 3) => (v === null || v === undefined ? '—' : v.toFixed(d));
const e = escapeHtml;

function table(head: string[], rows: (string | number)[][], caption?: string): string {
  const cell = (v: string | number) => (typeof v === 'number' ? String(v) : v);
  return (
    `<table>${caption ? `<caption class="note">${e(caption)}</caption>` : ''}<thead><tr>${head.map((h) => `<th>${e(h)}</th>`).join('')}</tr></thead>` +
    `<tbody>${rows.map((r) => `<tr>${r.map((v) => `<td>${cell(v)}</td>`).join('')}</tr>`).join('')}</tbody></table>`
  );
}

function summarySection(r: any): string {
  const st = r.statistics;
  const names: MetricName[] = r.metrics;
  const head = [
    'metric',
    'mean over folds',
    'SD',
    'pooled',
    ...(st ? [`pooled ${Math.round(st.level * 100)} % BCa`, 'corrected t interval of the mean'] : []),
  ];
  const rows = names.map((m) => {
    const s = r.summary[m];
    const iv = st?.intervals?.[m];
    const better = metricEntries[m].better === 'higher' ? '↑' : '↓';
    return [
      `${e(metricEntries[m].title)} <span class="note">${better}</span>`,
      num(s.mean),
      num(s.sd),
      num(s.pooled),
      ...(st
        ? [
            iv?.pooled?.bca ? `${num(iv.pooled.bca[0])}–${num(iv.pooled.bca[1])}` : '—',
            iv?.folds?.corrected ? `${num(iv.folds.corrected[0])}–${num(iv.folds.corrected[1])}` : '—',
          ]
        : []),
    ];
  });
  const perm = st?.permutation;
  const permText = perm
    ? `<p>Permutation test: ${perm.count} label permutations (seed ${perm.seed}), whole pipeline refitted; ${e(metricEntries[perm.metric as MetricName].title)} observed ${num(perm.observed)}, null median ${num(perm.null.median)}, <strong>p = ${perm['p-value'].toPrecision(3)}</strong>.</p>`
    : '';
  return `<h2 id="summary">Performance</h2>${table(head, rows)}<p class="note">Baseline: always predicting the training part's most common class gives accuracy ${num(r.baseline['accuracy-mean'])} (largest class share ${num(r.baseline['largest-class-share'])}).</p>${permText}`;
}

function dataSection(r: any, doc: any): string {
  const counts = r.data.classes.map((c: string, i: number) => `${e(c)}: ${r.data['class-counts'][i]}`).join(', ');
  return (
    `<h2 id="data">Data</h2><dl class="facts">` +
    `<dt>file</dt><dd><code>${e(doc.data.file)}</code></dd>` +
    `<dt>SHA-256</dt><dd class="hash">${e(r.data.sha256)}</dd>` +
    (doc.data.samples
      ? `<dt>sample sheet</dt><dd><code>${e(doc.data.samples.file)}</code> <span class="hash">${e(doc.data.samples.sha256)}</span></dd>`
      : '') +
    `<dt>rows</dt><dd>${r.data.rows}</dd><dt>features</dt><dd>${r.data.features.length}</dd>` +
    `<dt>classes</dt><dd>${counts}${r.positive !== undefined ? ` (positive: ${e(r.positive)})` : ''}</dd></dl>`
  );
}

function splitSection(r: any): string {
  const s = r.split;
  const rows = r.folds.map((f: any) => [f.repeat, f.fold, f['train-rows'], f['test-rows'], f['test-class-counts'].join(' / ')]);
  return (
    `<h2 id="split">Split design</h2><dl class="facts">` +
    `<dt>rule</dt><dd>${e(s.rule ?? 'pinned assignment')} (${e(s.version)})</dd>` +
    `<dt>seed</dt><dd>${s.seed ?? '—'}</dd><dt>folds × repeats</dt><dd>${s.folds} × ${s.repeats}</dd>` +
    `<dt>assignment SHA-256</dt><dd class="hash">${e(s['assignment-sha256'])}</dd></dl>` +
    table(['repeat', 'fold', 'training rows', 'test rows', `test rows per class (${r.classes.join(' / ')})`], rows)
  );
}

function foldSection(r: any): string {
  const names: MetricName[] = r.metrics;
  // A tuned run shows each outer fold's chosen values beside its scores.
  const tuned: string[] = r.tuning ? Object.keys(r.tuning.candidates[0]) : [];
  const rows = r.folds.map((f: any, i: number) => [
    f.repeat,
    f.fold,
    ...names.map((m) => num(f.metrics[m])),
    ...tuned.map((name) => String(r.tuning.folds[i].chosen[name])),
  ]);
  const nested = r.tuning
    ? `<p class="note">Nested estimate: ${e(tuned.join(' and '))} were chosen inside each outer fold by mean inner ${e(metricEntries[r.tuning.metric as MetricName].title)}, on its training rows only; results.json lists every candidate's inner score.</p>`
    : '';
  return `<h2 id="folds">Per fold</h2>${table(['repeat', 'fold', ...names.map((m) => metricEntries[m].title), ...tuned.map((n) => `chosen ${n}`)], rows)}${nested}`;
}

function figuresSection(input: ReportInput): string {
  const figs = input.figures
    .map(
      ({ plot, svg }) =>
        `<figure id="fig-${e(plot.id)}" role="img" aria-label="${e(plot.alt)}">${svg}<figcaption><strong>${e(plot.title)}.</strong> ${e(plot.alt)}</figcaption></figure>`,
    )
    .join('');
  const m = confusion(input.oof);
  const classes = input.oof.classes;
  const repeats = input.results.split.repeats;
  const cm = table(
    ['true \\ predicted', ...classes],
    m.map((row, i) => [`<strong>${e(classes[i])}</strong>`, ...row]),
    `Confusion matrix of the out-of-fold predictions${repeats > 1 ? `, summed over ${repeats} repeats (each row counted once per repeat)` : ''}.`,
  );
  return `<h2 id="figures">Curves, calibration and confusion</h2><div class="figures">${figs}</div>${cm}`;
}

function stabilitySection(input: ReportInput): string {
  if (!input.models) return '';
  const { total, features } = featureStability(input.models);
  if (!features.length) return '';
  const selected = features.length < input.results.data.features.length;
  const top = features.slice(0, 50);
  const always = features.filter((f) => f.folds === total).map((f) => f.feature);
  return (
    `<h2 id="features">Features the fold models used</h2>` +
    `<p>${selected ? `In-fold selection kept ${features.length} distinct features across the ${total} fold models; ${always.length} were kept in every fold.` : `Every fold model read all ${features.length} features (no selection).`}</p>` +
    table(
      ['feature', 'fold models', 'share'],
      top.map((f) => [`<code>${e(f.feature)}</code>`, `${f.folds} / ${total}`, num(f.share, 2)]),
    ) +
    (features.length > 50 ? `<p class="note">${features.length - 50} more in models.json.</p>` : '') +
    (always.length ? `<p class="note">Kept in every fold (one per line, to copy):</p><pre>${always.map(e).join('\n')}</pre>` : '')
  );
}

function appliedSection(applied: AppliedRow[] | undefined, rule: string): string {
  if (!applied?.length) return '';
  const split = applied.filter((a) => a.agreement < 1);
  return (
    `<h2 id="new-rows">New rows</h2><p>${applied.length} rows predicted by reconciling the fold models (${e(rule)}); ` +
    `${split.length} where the fold models disagree.</p>` +
    (split.length
      ? table(
          ['id', 'source', 'predicted', 'agreement'],
          split.slice(0, 100).map((a) => [e(a.id), e(a.source), e(a.predicted), num(a.agreement, 2)]),
        )
      : '')
  );
}

function auditSection(audit: ReportInput['audit']): string {
  if ('missing' in audit) return `<h2 id="audit">Leakage audit</h2><p class="note">${e(audit.missing)}</p>`;
  const rows = audit.findings.map((f) => [
    f.severity === 'warning' ? '<span class="warning">warning</span>' : e(f.severity),
    `<code>${e(f.code.replace(/^audit-/, ''))}</code>`,
    e(f.message),
    f.file ? `<code>${e(f.file)}${f.position ? `:${f.position.line}:${f.position.col}` : ''}</code>` : '',
  ]);
  return (
    `<h2 id="audit">Leakage audit</h2>` +
    (rows.length
      ? table(['', 'kind', 'finding', 'where'], rows)
      : '<p>No finding: no copies across folds, no split subjects, no single-feature label proxy, no confounded covariate.</p>') +
    (audit.skipped.length ? `<p class="note">Not run for a table this size: ${audit.skipped.map(e).join(', ')}.</p>` : '')
  );
}

function signatureSection(input: ReportInput): string {
  const s = input.signature;
  const status =
    s.status === 'valid'
      ? `valid, signed by key <span class="hash">${e(s.signedBy ?? '')}</span>${s.sshFingerprint ? ` (OpenSSH ${e(s.sshFingerprint)})` : ''}${s.pinned ? '' : " — the key embedded in the manifest; check it against the author's published key: <code>foldseal verify manifest.json --key AUTHOR.pub</code>"}`
      : s.status === 'unsigned'
        ? 'not signed'
        : `<span class="warning">does not check</span>: ${s.problems.map(e).join('; ')}`;
  const files = Object.entries(input.manifest.files ?? {}).map(([name, hash]) => [
    `<code>${e(name)}</code>`,
    `<span class="hash">${e(String(hash))}</span>`,
  ]);
  return (
    `<h2 id="signature">Manifest and signature</h2><dl class="facts"><dt>manifest SHA-256</dt><dd class="hash">${e(input.manifestSha256)}</dd>` +
    `<dt>signature</dt><dd>${status}</dd><dt>created</dt><dd>${e(String(input.manifest.created ?? ''))}</dd>` +
    `<dt>foldseal</dt><dd>${e(input.toolVersion)}</dd></dl>${table(['file', 'SHA-256'], files)}`
  );
}

const CAUTIONS =
  'Cross-validated scores estimate how this modelling procedure performs on data like these; they are not a validation of a ' +
  'diagnostic or clinical test. Before any clinical or diagnostic use, a model needs independent external validation and the ' +
  'approvals that local regulations and licensed professional practice require; this report does not replace either.';

export function reportHtml(input: ReportInput): string {
  const r = input.results;
  const doc = input.manifest.protocol.document;
  const title = `${r.protocol.name} — cross-validation report`;
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8">${REPORT_MARK}<meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<title>${e(title)}</title><style>${STYLE}</style></head>
<body><main>
<header class="top"><div class="kicker">foldseal report</div><h1>${e(r.protocol.name)}</h1>${doc.description ? `<p>${e(doc.description)}</p>` : ''}</header>
<div class="caution" role="note"><strong>Caution.</strong> ${e(CAUTIONS)}</div>
<h2 id="methods">Methods</h2><p class="methods" id="methods-text">${e(input.methods)}</p>
${summarySection(r)}
${dataSection(r, doc)}
${splitSection(r)}
${foldSection(r)}
${figuresSection(input)}
${stabilitySection(input)}
${appliedSection(input.applied, doc.reconcile?.rule ?? 'mean-probability')}
${auditSection(input.audit)}
${signatureSection(input)}
<h2 id="protocol">Protocol</h2><pre>${e(input.protocolYaml)}</pre>
</main></body></html>
`;
}
