import { dirname, join, relative, resolve } from 'node:path';
import { writeOutputFile } from '../../io/output-file.js';
import { openOutputDir, type OutputDir } from '../../io/output-dir.js';
import { produceRun, type ProduceOptions } from '../../io/produce-run.js';
import { auditLine } from '../audit-text.js';
import { MANIFEST_SCHEMA, schemaValidator } from '../../io/schemas.js';
import { protocolPolicy } from '../../io/path-policy.js';
import { shown } from '../../io/validate.js';
import { manifestForRun } from '../../run/manifest-of-run.js';
import { disagreementReport } from '../../reconcile/applied.js';
import { cvTables, newRowScoreLines, statisticsLines, tuningLines } from '../cv-table.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems } from '../report-problems.js';
import { toolInfo } from '../tool-info.js';
import type { Protocol } from '../../protocol/types.js';
import type { RunOutput } from '../../run/run.js';
import type { ChosenCount } from '../../run/results.js';

export interface RunArgs {
  protocol: string;
  out?: string;
  force?: boolean;
  refit?: boolean;
  key?: string;
  allowOutside?: boolean;
  /** Also write report.html into the results folder (with the audit this run made). */
  report?: boolean;
  /** "I/N": compute only shard I of N and write its part (see foldseal merge). */
  shard?: string;
  /** Consent to run a command model's program. */
  allowCommands?: boolean;
  /** Programs run at once for a command model. */
  jobs?: number;
}

export async function runCommand(args: RunArgs, io: CommandIo, merged?: ProduceOptions['merged']): Promise<ExitCode> {
  if (args.shard !== undefined) return (await import('./shard.js')).shardCommand(args, io);
  // The signing modules load only when a key is given.
  const key = args.key ? await (await import('../../io/keys.js')).readSigningKey(args.key) : undefined;
  const started = Date.now();
  let lastShown = 0;
  const progress = (what: string) => (done: number, total: number) => {
    // Progress only for a person at a terminal, and only once the run has taken a while.
    const now = Date.now();
    if (io.errIsTty && now - started > 1500 && now - lastShown > 200) {
      io.err(`\r\x1b[K${what} ${done}/${total}`);
      lastShown = now;
    }
  };
  // The results folder is opened once the folds are fitted, and predictions.csv and models.json written into it as they are made.
  let folder: { dir: string; out: OutputDir } | undefined;
  const produced = await produceRun(args.protocol, {
    outputSink: async (input) => {
      const dir = resolve(args.out ?? `results/${input.protocol.name}`);
      folder = { dir, out: await openOutputDir(dir, Boolean(args.force), shown(dir)) };
      return (name, pieces) => folder!.out.stream(name, pieces);
    },
    merged,
    audit: true,
    refit: args.refit,
    hooks: { onFold: progress('fitting fold') },
    onPermutation: progress('permutation'),
    access: protocolPolicy(args.protocol, Boolean(args.allowOutside)),
    repoRules: true,
    allowCommands: args.allowCommands,
    jobs: args.jobs,
  }).catch(async (e: unknown) => {
    await folder?.out.abort();
    throw e;
  });
  try {
    return await finish(args, io, produced, folder, key, lastShown > 0);
  } catch (e) {
    await folder?.out.abort();
    throw e;
  }
}

async function finish(
  args: RunArgs,
  io: CommandIo,
  { report, input, out, audit }: Awaited<ReturnType<typeof produceRun>>,
  folder: { dir: string; out: OutputDir } | undefined,
  key: Awaited<ReturnType<typeof import('../../io/keys.js').readSigningKey>> | undefined,
  progressShown: boolean,
): Promise<ExitCode> {
  if (progressShown) io.err('\r\x1b[K');
  reportProblems(io, report.problems, 'text');
  if (report.unreadable) return 2;
  if (!input || !out || !folder) return 1;
  reportProblems(io, out.cv.warnings, 'text');
  const dir = folder.dir;
  // The files made already go into the new folder now, and their bytes are let go before the
  // manifest is built (on a million rows each is tens of megabytes).
  const early = Object.keys(out.files) as (keyof RunOutput['files'])[];
  for (const name of early) {
    const content = out.files[name]!;
    folder.out.stream(name, [typeof content === 'string' ? Buffer.from(content) : content]);
    delete (out.files as Partial<RunOutput['files']>)[name];
  }
  const { bytes } = manifestForRun(input, out, {
    tool: toolInfo(),
    created: new Date().toISOString(),
    protocolLocation:
      relative(dir, dirname(resolve(args.protocol)))
        .split('\\')
        .join('/') || '.',
    key: key?.kind === 'raw' ? key : undefined,
    validate: schemaValidator(MANIFEST_SCHEMA),
    textOnly: true,
  });
  const written: Record<string, string | Uint8Array> = { 'manifest.json': bytes };
  // An SSH key signs the manifest's bytes in manifest.json.sig, the file `ssh-keygen -Y verify` reads.
  if (key?.kind === 'ssh') {
    const { encodeSshsig, MANIFEST_NAMESPACE, sshsigSignedData } = await import('../../manifest/ssh.js');
    written['manifest.json.sig'] = encodeSshsig(
      key.blob,
      MANIFEST_NAMESPACE,
      'sha512',
      await key.sign(sshsigSignedData(MANIFEST_NAMESPACE, 'sha512', bytes)),
    );
  }
  const committing = folder.out;
  folder = undefined;
  await committing.commit(written);
  io.out(cvTables(out.cv) + tunedLines(input.protocol, out) + statisticsLines(out.statistics));
  if (out.applied) io.out(`\nnew rows (reconcile: ${input.protocol.reconcile.rule}):\n` + disagreementReport(out.applied, out.cv.classes));
  if (out.newRowScores) io.out(newRowScoreLines(out.newRowScores, input.protocol.data.label));
  if (audit) io.out(auditLine(args.protocol, audit) + '\n');
  if (args.report) {
    const { buildReport } = await import('../../io/report.js');
    const built = await buildReport(dir, { audit, toolVersion: toolInfo().version });
    await writeOutputFile(join(dir, 'report.html'), built.html, shown(join(dir, 'report.html')), true);
    written['report.html'] = built.html;
  }
  io.out(
    `wrote ${[...early, ...Object.keys(written), 'predictions.csv', 'models.json'].sort().join(', ')} to ` +
      `${shown(dir)}${key?.kind === 'ssh' ? ` (manifest signed with SSH key ${key.describe})` : key ? ' (manifest signed)' : ''}\n`,
  );
  return 0;
}

function tunedLines(p: Protocol, out: RunOutput): string {
  if (!out.cv.tuning) return '';
  const t = out.results.tuning as {
    'chosen-counts': Record<string, ChosenCount[]>;
    refit: { chosen: Record<string, number | string> } | null;
  };
  return tuningLines(t['chosen-counts'], p.tune!.metric, t.refit?.chosen);
}
