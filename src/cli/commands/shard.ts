import { resolve } from 'node:path';
import { protocolPolicy } from '../../io/path-policy.js';
import { writeOutputFile } from '../../io/output-file.js';
import { produceShard } from '../../io/shard.js';
import { shown } from '../../io/validate.js';
import { error, FoldsealError } from '../../problems/problem.js';
import { encodePart, parseShard } from '../../run/shards.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems } from '../report-problems.js';
import type { RunArgs } from './run.js';

/** `run --shard I/N`: one shard's part, written atomically (a killed job leaves no file, so a workflow engine simply runs it again). */
export async function shardCommand(args: RunArgs, io: CommandIo): Promise<ExitCode> {
  const shard = parseShard(args.shard!);
  if (!shard)
    throw new FoldsealError(
      error('bad-option', `--shard must be I/N with 1 ≤ I ≤ N (for example 2/8), not ${JSON.stringify(args.shard)}`),
      2,
    );
  if (args.key || args.report || args.refit)
    throw new FoldsealError(error('bad-option', '--key, --report and --refit belong to the merge: give them to foldseal merge'), 2);
  const { report, part } = await produceShard(args.protocol, shard, protocolPolicy(args.protocol, Boolean(args.allowOutside)));
  reportProblems(io, report.problems, 'text');
  if (report.unreadable) return 2;
  if (!part) return 1;
  const out = resolve(args.out ?? `results/${report.protocol!.name}.part-${shard.index}-of-${shard.count}.json`);
  await writeOutputFile(out, encodePart(part), shown(out), Boolean(args.force));
  io.out(
    `shard ${shard.index}/${shard.count}: ${part.units.length} work units (${part.fits.length} fold fits, ${part.permutations.length} permutations); wrote ${shown(out)}\n`,
  );
  return 0;
}
