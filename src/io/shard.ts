/** The shell of sharded runs: compute one shard's units of a protocol, and read parts back for `merge`. */
import { readRegularText } from './files.js';
import { packageVersion } from './package-root.js';
import { validateProtocol } from './validate.js';
import type { PathPolicy } from './path-policy.js';
import { error, FoldsealError, hasErrors } from '../problems/problem.js';
import { canonicalSha256 } from '../manifest/canonical.js';
import { planFolds } from '../run/cross-validate.js';
import { runAll } from '../run/executor.js';
import { permutedScores } from '../run/permutation.js';
import { decodePart, SHARD_VERSION, unitName, unitsOfShard, workUnits, type ShardPart } from '../run/shards.js';
import { assignmentSha256 } from '../split/csv.js';
import type { ValidationReport } from '../protocol/report.js';
import { asUserError } from '../run/run.js';

/** What every part of a run must share: the hashes of the protocol, the data and the fold assignment. */
export function runIdentity(report: ValidationReport) {
  return {
    'protocol-sha256': canonicalSha256(report.raw),
    'data-sha256': report.dataSha256!,
    'assignment-sha256': assignmentSha256(report.assignment!),
  };
}

export function unitsOf(report: ValidationReport) {
  const p = report.protocol!;
  const plans = planFolds(p, report.table!, report.assignment!);
  return { plans, units: workUnits(plans, p.statistics?.permutation?.count ?? 0) };
}

/** One shard's part: the fold fits and permutation scores of its units (the data read once, its hash checked). */
export async function produceShard(
  path: string,
  shard: { index: number; count: number },
  access: PathPolicy,
): Promise<{ report: ValidationReport; part?: ShardPart }> {
  const report = await validateProtocol(path, { access });
  if (report.unreadable || hasErrors(report.problems) || !report.protocol || !report.table || !report.assignment) return { report };
  const p = report.protocol;
  if (p.model.kind === 'command')
    throw new FoldsealError(
      error(
        'command-unsupported',
        'run --shard does not run command models yet: run the protocol whole (--jobs sets how many folds run at once)',
        {
          file: report.file,
        },
      ),
      2,
    );
  const { plans, units } = unitsOf(report);
  const mine = unitsOfShard(units, shard.index, shard.count);
  try {
    const foldUnits = mine.filter((u) => u.kind === 'fold');
    const fits = runAll(
      p,
      report.table,
      report.assignment,
      foldUnits.map((u) => plans[u.index]),
    );
    const permutations = mine
      .filter((u) => u.kind === 'permutation')
      .map((u) => {
        const score = permutedScores(p, report.table!, report.assignment!, u.index, u.index)[0];
        return { unit: unitName(u), score: Number.isNaN(score) ? null : score };
      });
    return {
      report,
      part: {
        'foldseal-shard': SHARD_VERSION,
        ...runIdentity(report),
        tool: `foldseal ${packageVersion()}`,
        shard,
        units: mine.map(unitName),
        fits: foldUnits.map((u, i) => ({ unit: unitName(u), ...fits[i] })),
        permutations,
      },
    };
  } catch (e) {
    throw asUserError(e, report.file);
  }
}

export async function readPart(path: string): Promise<ShardPart> {
  return decodePart(await readRegularText(path, 1 << 30));
}
