import { basename, dirname, relative, resolve } from 'node:path';
import { tableContent } from '../../io/table-content.js';
import { readBytes } from '../../io/files.js';
import { writeOutputFile } from '../../io/output-file.js';
import { protocolPolicy } from '../../io/path-policy.js';
import { schemaPath } from '../../io/schemas.js';
import { shown, validateProtocol } from '../../io/validate.js';
import { error, FoldsealError, hasErrors } from '../../problems/problem.js';
import { protocolTemplate, slugFrom } from '../../protocol/template.js';
import { DEFAULT_MISSING } from '../../protocol/types.js';
import { columnsGrid, type ColumnTable } from '../../table/columns.js';
import { delimitedGrid, readDelimited } from '../../table/delimited.js';
import type { Grid } from '../../table/grid.js';
import { samplesAreColumns, suspectColumns, type Suspect } from '../../table/detect.js';
import { delimiterFor, tableFromLayout } from '../../table/load.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems } from '../report-problems.js';

export interface InitArgs {
  data: string;
  label: string;
  id?: string;
  group?: string;
  out?: string;
  force?: boolean;
  /** A sample sheet holding the id, label and group. */
  samples?: string;
  exclude?: string[];
  positive?: string;
  /** COLUMN=VALUE,VALUE… */
  where?: string[];
  /** CLASS=VALUE,VALUE…: label values that make up a class. */
  class?: string[];
}

/** The file's content (gzip decompressed, Parquet decoded) and the SHA-256 of its bytes on disk. */
async function readText(path: string): Promise<{ bytes: Uint8Array | ColumnTable; sha256: string }> {
  const read = await readBytes(path, shown(path));
  if (read.problem) throw new FoldsealError(read.problem, 2);
  const plain = await tableContent(read.bytes!, shown(path), { file: shown(path) });
  if (plain.problem) throw new FoldsealError(plain.problem, 1);
  return { bytes: plain.content, sha256: read.sha256! };
}

/** A read file as a Grid (undefined when it is not a table). */
function gridOfContent(content: Uint8Array | ColumnTable, path: string): Grid | undefined {
  if (!(content instanceof Uint8Array)) return columnsGrid(content);
  const read = readDelimited(content, delimiterFor(path), shown(path));
  return read.table && delimitedGrid(read.table);
}

function parseLists(option: string, items: readonly string[], example: string): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const item of items) {
    const eq = item.indexOf('=');
    if (eq <= 0)
      throw new FoldsealError(
        error('bad-option', `${option} ${JSON.stringify(item)} is not NAME=VALUE[,VALUE…]`, { hint: `e.g. ${option} ${example}` }),
        2,
      );
    out[item.slice(0, eq)] = [...new Set(item.slice(eq + 1).split(','))];
  }
  return out;
}

const stemOf = (path: string) =>
  basename(path)
    .replace(/\.gz$/i, '')
    .replace(/\.[^.]*$/, '');

export async function initCommand(args: InitArgs, io: CommandIo): Promise<ExitCode> {
  const dataPath = resolve(args.data);
  const stem = stemOf(dataPath);
  const out = resolve(args.out ?? `${stem}.protocol.yaml`);
  const where = parseLists('--where', args.where ?? [], 'cell_type=B,B1,B2');
  const classes = parseLists('--class', args.class ?? [], 'B-cell=B,B1,B2');
  if (Object.keys(classes).length === 1)
    throw new FoldsealError(error('bad-option', 'one --class makes one class; give every class its own --class'), 2);
  const data = await readText(dataPath);
  const sheetPath = args.samples ? resolve(args.samples) : undefined;
  if (sheetPath && !args.id)
    throw new FoldsealError(error('samples-without-id', '--samples needs --id: the sample sheet is joined to the data by that column'), 2);
  const sheet = sheetPath ? await readText(sheetPath) : undefined;
  // Orientation: a header that names the sheet's samples means one column per sample.
  let layout: 'samples-in-rows' | 'features-in-rows' = 'samples-in-rows';
  if (sheet && sheetPath) {
    const s = gridOfContent(sheet.bytes, sheetPath);
    const m = gridOfContent(data.bytes, dataPath);
    const idCol = s?.header.indexOf(args.id!) ?? -1;
    const ids = s && idCol >= 0 ? new Set(Array.from({ length: s.rows }, (_, r) => s.text(r, idCol))) : new Set<string>();
    if (m && samplesAreColumns(m.header, ids)) layout = 'features-in-rows';
  }
  const exclude: Suspect[] = (args.exclude ?? []).map((column) => ({ column, reason: 'left out with --exclude' }));
  const build = () =>
    tableFromLayout(
      data.bytes,
      shown(dataPath),
      {
        id: args.id,
        label: args.label,
        group: args.group,
        missing: DEFAULT_MISSING,
        where: Object.keys(where).length ? where : undefined,
        classes: Object.keys(classes).length ? classes : undefined,
        features: exclude.length ? { exclude: exclude.map((e) => e.column) } : undefined,
      },
      undefined,
      layout,
      sheet && sheetPath ? { bytes: sheet.bytes, file: shown(sheetPath), unmatched: 'error', at: {} } : undefined,
      () => undefined,
    );
  let built = build();
  // Codes, ids and covariates that look numeric are left out, said so here and in the protocol.
  if (layout === 'samples-in-rows' && built.table) {
    const g = gridOfContent(data.bytes, dataPath);
    if (g) {
      const names = new Set(built.table.featureNames);
      const found = suspectColumns(
        g,
        g.header.flatMap((h, c) => (names.has(h) ? [c] : [])),
        new Set(DEFAULT_MISSING),
      );
      if (found.length) {
        exclude.push(...found);
        built = build();
      }
    }
  }
  if (!built.table || hasErrors(built.problems)) {
    reportProblems(io, built.problems, 'text');
    return 1;
  }
  const t = built.table;
  if (args.positive !== undefined && !t.classes.includes(args.positive))
    throw new FoldsealError(
      error('unknown-class', `--positive ${args.positive} is not a class; the classes are ${t.classes.join(', ')}`),
      2,
    );
  const classCounts = t.classes.map((_, k) => t.y.reduce((s, v) => s + (v === k ? 1 : 0), 0));
  const text = protocolTemplate({
    name: slugFrom(stem),
    dataFile: toPosix(relative(dirname(out), dataPath)),
    sha256: data.sha256,
    id: args.id,
    label: args.label,
    group: args.group,
    classCounts,
    groupCount: t.groups ? new Set(t.groups).size : undefined,
    schemaPath: toPosix(relative(dirname(out), schemaPath('protocol.schema.json'))),
    // A fixed seed derived from the data hash: reproducible, and not chosen after seeing scores.
    seed: parseInt(data.sha256.slice(0, 8), 16),
    layout,
    samples: sheet && sheetPath ? { file: toPosix(relative(dirname(out), sheetPath)), sha256: sheet.sha256 } : undefined,
    exclude,
    positive: args.positive,
    where: Object.keys(where).length ? where : undefined,
    classes: Object.keys(classes).length ? classes : undefined,
  });
  await writeOutputFile(out, text, shown(out), Boolean(args.force));
  // The user named the data files: the protocol may point to them wherever they lie.
  const policy = protocolPolicy(out);
  const roots = [...policy.roots, dirname(dataPath), ...(sheetPath ? [dirname(sheetPath)] : [])];
  const report = await validateProtocol(out, { access: { ...policy, roots } });
  reportProblems(io, report.problems, 'text');
  for (const e of exclude.filter((x) => !(args.exclude ?? []).includes(x.column)))
    io.err(`note: column "${e.column}" is not a feature: it looks like ${e.reason} (data.features.exclude; remove it there to use it)\n`);
  io.err(
    `wrote ${shown(out)} (${layout === 'features-in-rows' ? 'features in rows, ' : ''}${t.ids.length} rows, ${t.classes.length} classes, ` +
      `${t.X.cols} features${built.filtered ? `; ${built.filtered.after} of ${built.filtered.before} rows kept by --where` : ''})\n`,
  );
  return hasErrors(report.problems) ? 1 : 0;
}

function toPosix(p: string): string {
  return p.split('\\').join('/');
}
