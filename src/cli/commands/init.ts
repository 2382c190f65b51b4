import { writeOutputFile } from '../../io/output-file.js';
import { protocolPolicy } from '../../io/path-policy.js';
import { basename, dirname, extname, relative, resolve } from 'node:path';
import { hasErrors } from '../../problems/problem.js';
import { FoldsealError } from '../../problems/problem.js';
import { readBytes } from '../../io/files.js';
import { shown, validateProtocol } from '../../io/validate.js';
import { DEFAULT_MISSING } from '../../protocol/types.js';
import { protocolTemplate, slugFrom } from '../../protocol/template.js';
import { tableFromBytes } from '../../table/load.js';
import { schemaPath } from '../../io/schemas.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems } from '../report-problems.js';

export interface InitArgs {
  data: string;
  label: string;
  id?: string;
  group?: string;
  out?: string;
  force?: boolean;
}

export async function initCommand(args: InitArgs, io: CommandIo): Promise<ExitCode> {
  const dataPath = resolve(args.data);
  const stem = basename(dataPath, extname(dataPath));
  const out = resolve(args.out ?? `${stem}.protocol.yaml`);
  const read = await readBytes(dataPath, shown(dataPath));
  if (read.problem) throw new FoldsealError(read.problem, 2);
  const built = tableFromBytes(
    read.bytes!,
    shown(dataPath),
    { id: args.id, label: args.label, group: args.group, missing: DEFAULT_MISSING },
    undefined,
    () => undefined,
  );
  if (!built.table || hasErrors(built.problems)) {
    reportProblems(io, built.problems, 'text');
    return 1;
  }
  const t = built.table;
  const classCounts = t.classes.map((_, k) => t.y.reduce((s, v) => s + (v === k ? 1 : 0), 0));
  const schemaFile = schemaPath('protocol.schema.json');
  const text = protocolTemplate({
    name: slugFrom(stem),
    dataFile: toPosix(relative(dirname(out), dataPath)),
    sha256: read.sha256!,
    id: args.id,
    label: args.label,
    group: args.group,
    classCounts,
    groupCount: t.groups ? new Set(t.groups).size : undefined,
    schemaPath: toPosix(relative(dirname(out), schemaFile)),
    // A fixed seed derived from the data hash: reproducible, and not chosen after seeing scores.
    seed: parseInt(read.sha256!.slice(0, 8), 16),
  });
  await writeOutputFile(out, text, shown(out), Boolean(args.force));
  // The user named the data file: the protocol may point to it wherever it lies.
  const policy = protocolPolicy(out);
  const report = await validateProtocol(out, { access: { ...policy, roots: [...policy.roots, dirname(dataPath)] } });
  reportProblems(io, report.problems, 'text');
  io.err(`wrote ${shown(out)} (${t.ids.length} rows, ${t.classes.length} classes, ${t.X.cols} features)\n`);
  return hasErrors(report.problems) ? 1 : 0;
}

function toPosix(p: string): string {
  return p.split('\\').join('/');
}
