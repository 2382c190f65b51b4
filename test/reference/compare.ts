/** Runs one reference case through foldseal (split pinned to the exported folds) and pairs it with the fixture. */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { validateProtocol } from '../../src/io/validate.js';
import { runProtocol, type RunOutput } from '../../src/run/run.js';
import type { Table } from '../../src/table/table.js';
import { tempDir } from '../helpers.js';
// @ts-expect-error -- plain ESM helper shared with the fixture maker
import { caseProtocol, referenceDir } from './case-protocol.mjs';

export interface ReferenceCase {
  name: string;
  metrics: string[];
  [k: string]: unknown;
}
export interface ReferenceFold {
  repeat: number;
  fold: number;
  ids: string[];
  proba: number[][];
  features: string[];
  metrics: Record<string, number>;
}
export interface ReferenceFixture {
  reference: string;
  classes: string[];
  folds: ReferenceFold[];
  pooled: Record<string, number>[];
}

export const refDir: string = referenceDir;

export function referenceCases(): ReferenceCase[] {
  return JSON.parse(readFileSync(join(refDir, 'cases.json'), 'utf8')) as ReferenceCase[];
}

export function fixture(name: string, dir = join(refDir, 'fixtures')): ReferenceFixture {
  return JSON.parse(readFileSync(join(dir, `${name}.json`), 'utf8')) as ReferenceFixture;
}

export async function runCase(c: ReferenceCase): Promise<{ out: RunOutput; ids: string[]; table: Table }> {
  const dir = tempDir();
  const protocol = join(dir, 'p.yaml');
  writeFileSync(protocol, caseProtocol(c, dir, join(refDir, 'fixtures', `${c.name}.folds.csv`)));
  // The case protocols point into the repository's reference data from a temporary folder.
  const report = await validateProtocol(protocol, { access: { roots: [], allowOutside: true } });
  const errors = report.problems.filter((p) => p.severity === 'error');
  if (errors.length || !report.protocol || !report.table || !report.assignment)
    throw new Error(`case ${c.name} does not validate: ${errors.map((e) => e.message).join('; ')}`);
  const out = runProtocol({
    protocol: report.protocol,
    raw: report.raw,
    newRows: report.newRows,
    protocolFile: report.file,
    table: report.table,
    dataSha256: report.dataSha256!,
    assignment: report.assignment,
    warnings: [],
  });
  return { out, ids: report.table.ids, table: report.table };
}
