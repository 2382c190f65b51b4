/**
 * The shell of `report`: reads a results folder (each file checked against the hash results.json
 * records), checks the manifest's signature, renders the plots to SVG with Vega (loaded only here)
 * and hands everything to the pure page builder.
 */
import { readFile } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import { stringify } from 'yaml';
import type { AuditResult } from '../audit/audit.js';
import { checkManifest } from '../manifest/check.js';
import { normalizeProtocol } from '../protocol/normalize.js';
import { methodsParagraph } from '../report/methods.js';
import { reportHtml, type AppliedRow, type ReportInput } from '../report/page.js';
import { curvePlots, reliabilityPlot, type Plot } from '../report/plots.js';
import { parsePredictions } from '../report/predictions.js';
import { delimitedGrid, readDelimited } from '../table/delimited.js';
import { sha256Bytes } from '../util/sha256.js';
import { readInput, readRecorded, readResults } from './results-dir.js';
import { MANIFEST_SCHEMA, schemaValidator } from './schemas.js';
import { shown } from './validate.js';
import { importPackage } from './import-package.js';

export interface Report {
  html: string;
  methods: string;
}

/** SVG text of a Vega-Lite specification, rendered headless (no canvas, no network: the data are inline). */
export async function renderSvg(spec: Record<string, unknown>): Promise<string> {
  const [vega, vl] = await Promise.all([
    importPackage<typeof import('vega')>('vega'),
    importPackage<typeof import('vega-lite')>('vega-lite'),
  ]);
  const view = new vega.View(vega.parse(vl.compile(spec as never).spec), { renderer: 'none', loader: vega.loader({ mode: 'file' }) });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

function appliedRows(bytes: Uint8Array, file: string): AppliedRow[] {
  const read = readDelimited(bytes, 44, file);
  if (!read.table) return [];
  const g = delimitedGrid(read.table);
  const col = (name: string) => g.header.indexOf(name);
  return Array.from({ length: g.rows }, (_, r) => ({
    id: g.text(r, col('id')),
    source: g.text(r, col('source')),
    predicted: g.text(r, col('predicted')),
    agreement: g.number(r, col('agreement')),
  }));
}

export async function buildReport(
  dir: string,
  options: { audit?: AuditResult; auditMissing?: string; toolVersion: string },
): Promise<Report> {
  const results = await readResults(dir);
  const manifestPath = join(dir, 'manifest.json');
  const manifestBytes = await readInput(manifestPath);
  const detached = await readFile(`${manifestPath}.sig`, 'utf8').catch(() => undefined);
  const check = checkManifest(manifestBytes.toString('utf8'), {
    file: shown(resolve(manifestPath)),
    allowUnpinned: true,
    detached,
    validate: schemaValidator(MANIFEST_SCHEMA),
  });
  const manifest = check.manifest as any;
  const oof = parsePredictions(await readRecorded(dir, 'predictions.csv', results, 'predictions-hash-mismatch'), 'predictions.csv');
  const models = results.files['models.json']
    ? JSON.parse((await readRecorded(dir, 'models.json', results, 'models-hash-mismatch')).toString('utf8'))
    : undefined;
  const applied = results.files['applied.csv']
    ? appliedRows(await readRecorded(dir, 'applied.csv', results, 'file-hash-mismatch'), 'applied.csv')
    : undefined;
  const doc = manifest?.protocol?.document;
  const protocol = normalizeProtocol(doc);
  const manifestSha256 = sha256Bytes(manifestBytes);
  const methods = methodsParagraph({ protocol, results, toolVersion: manifest.tool?.version ?? options.toolVersion, manifestSha256 });
  const positive = Math.max(0, results.classes.indexOf(results.positive));
  const plots: Plot[] = [...curvePlots(oof, positive), reliabilityPlot(oof, positive)];
  const figures = await Promise.all(plots.map(async (plot) => ({ plot, svg: await renderSvg(plot.spec) })));
  const input: ReportInput = {
    results,
    manifest,
    manifestSha256,
    protocolYaml: stringify(doc, { lineWidth: 100 }),
    methods,
    oof,
    models,
    applied,
    signature: {
      status: check.signedBy ? 'valid' : check.problems.some((p) => p.severity === 'error') ? 'invalid' : 'unsigned',
      signedBy: check.signedBy,
      sshFingerprint: check.sshFingerprint,
      pinned: check.pinned,
      problems: check.problems.filter((p) => p.severity === 'error').map((p) => p.message),
    },
    audit: options.audit
      ? { findings: options.audit.findings, skipped: options.audit.skipped }
      : { missing: options.auditMissing ?? 'Not included: pass --protocol PROTOCOL to `foldseal report` to audit the data.' },
    figures,
    toolVersion: options.toolVersion,
  };
  return { html: reportHtml(input), methods };
}
