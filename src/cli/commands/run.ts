import { dirname, relative, resolve } from 'node:path';
import { readPrivateKey } from '../../io/keys.js';
import { writeOutputDir } from '../../io/output-dir.js';
import { produceRun } from '../../io/produce-run.js';
import { protocolPolicy } from '../../io/path-policy.js';
import { shown } from '../../io/validate.js';
import { manifestForRun } from '../../manifest/for-run.js';
import { disagreementReport } from '../../reconcile/applied.js';
import { cvTables } from '../cv-table.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems } from '../report-problems.js';
import { toolInfo } from '../tool-info.js';

export interface RunArgs {
  protocol: string;
  out?: string;
  force?: boolean;
  refit?: boolean;
  key?: string;
  allowOutside?: boolean;
}

export async function runCommand(args: RunArgs, io: CommandIo): Promise<ExitCode> {
  const key = args.key ? await readPrivateKey(args.key) : undefined;
  const started = Date.now();
  let lastShown = 0;
  const onFold = (done: number, total: number) => {
    // Progress only for a person at a terminal, and only once the run has taken a while.
    const now = Date.now();
    if (io.errIsTty && now - started > 1500 && now - lastShown > 200) { io.err(`\rfitting fold ${done}/${total}`); lastShown = now; }
  };
  const { report, input, out } = await produceRun(args.protocol, { refit: args.refit, hooks: { onFold }, access: protocolPolicy(args.protocol, Boolean(args.allowOutside)), repoRules: true });
  if (lastShown) io.err('\r\x1b[K');
  reportProblems(io, report.problems, 'text');
  if (report.unreadable) return 2;
  if (!input || !out) return 1;
  reportProblems(io, out.cv.warnings, 'text');
  const dir = resolve(args.out ?? `results/${input.protocol.name}`);
  const { text } = manifestForRun(input, out, {
    tool: toolInfo(),
    created: new Date().toISOString(),
    protocolLocation: relative(dir, dirname(resolve(args.protocol))).split('\\').join('/') || '.',
    key,
  });
  await writeOutputDir(dir, { ...out.files, 'manifest.json': text }, Boolean(args.force), shown(dir));
  io.out(cvTables(out.cv));
  if (out.applied) io.out(`\nnew rows (reconcile: ${input.protocol.reconcile.rule}):\n` + disagreementReport(out.applied, out.cv.classes));
  io.out(`wrote ${[...Object.keys(out.files), 'manifest.json'].sort().join(', ')} to ${shown(dir)}${key ? ' (manifest signed)' : ''}\n`);
  return 0;
}
