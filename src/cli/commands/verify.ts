import { existsSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { error, FoldsealError, hasErrors, warning, type Problem } from '../../problems/problem.js';
import { sha256File } from '../../io/hash.js';
import { fileProblem, readRegularText } from '../../io/files.js';
import { localizeProtocol, reviewPolicy, withProtocolCopy } from '../../io/recorded-protocol.js';
import { selfCheck } from '../../manifest/self-check.js';
import { readPinnedKeys } from '../../io/keys.js';
import { MANIFEST_SCHEMA, schemaValidator } from '../../io/schemas.js';
import { produceRun } from '../../io/produce-run.js';
import { loadProtocol, shown } from '../../io/validate.js';
import type { Manifest } from '../../manifest/build.js';
import { canonicalSha256 } from '../../manifest/canonical.js';
import { checkManifest, type ManifestCheck } from '../../manifest/check.js';
import { compareRuns, verdict, type Difference } from '../../manifest/compare.js';
import { manifestForRun } from '../../run/manifest-of-run.js';
import type { CommandIo, ExitCode } from '../io.js';
import { reportProblems, type OutputFormat } from '../report-problems.js';
import { toolInfo } from '../tool-info.js';

export interface VerifyArgs {
  manifest: string;
  key?: string;
  rerun?: boolean;
  data?: string;
  protocol?: string;
  format: OutputFormat;
  allowUnpinned?: boolean;
  /** Re-run although the manifest is not signed by a pinned key. */
  allowUnsigned?: boolean;
  /** Let the re-run read files outside the review folders. */
  allowOutside?: boolean;
  strict?: boolean;
  /** Consent to run a command model's program for the re-run. */
  allowCommands?: boolean;
}

export async function verifyCommand(args: VerifyArgs, io: CommandIo): Promise<ExitCode> {
  const file = shown(resolve(args.manifest));
  let text: string;
  try {
    text = await readRegularText(args.manifest, MANIFEST_MAX_BYTES);
  } catch (e) {
    throw new FoldsealError(fileProblem(e as NodeJS.ErrnoException, file, { file }), 2);
  }
  const pinned = args.key ? await readPinnedKeys(args.key) : undefined;
  const detached = await readFileOr(`${resolve(args.manifest)}.sig`, undefined);
  const check = checkManifest(text, {
    file,
    pinned,
    allowUnpinned: args.allowUnpinned,
    detached,
    validate: schemaValidator(MANIFEST_SCHEMA),
  });
  const problems: Problem[] = [...check.problems];
  const lines: string[] = [];
  let differences: Difference[] = [];
  const m = check.manifest as any;
  const usable = m && !problems.some((p) => p.code === 'manifest-schema');
  if (usable) {
    lines.push(signatureLine(check));
    lines.push(`files: ${await checkSiblings(m, dirname(resolve(args.manifest)), Boolean(args.strict), problems)}`);
    const inconsistent = selfCheck(m, file, await readFileOr(join(dirname(resolve(args.manifest)), 'results.json'), undefined));
    problems.push(...inconsistent);
    const trusted = check.pinned && check.signedBy !== undefined && !hasErrors(check.problems);
    if (args.rerun && inconsistent.length) {
      problems.push(error('rerun-failed', 'the manifest contradicts itself, so it was not re-run', { file }));
    } else if (args.rerun && !trusted && !args.allowUnsigned) {
      problems.push(
        error(
          'rerun-untrusted',
          `the manifest is not ${check.signedBy ? 'signed by a pinned key' : 'validly signed'}, so its protocol was not re-run: a ` +
            `re-run reads the files the manifest names`,
          { file, hint: "pin the author's key with --key AUTHOR.pub, or pass --allow-unsigned if you trust where this manifest came from" },
        ),
      );
      problems.push(error('rerun-failed', 'not re-run', { file }));
    } else if (args.rerun) {
      const rerun = await rerunManifest(m, args, problems);
      differences = rerun.differences;
      lines.push(...rerun.lines);
    }
  }
  const failed = hasErrors(problems) || differences.length > 0;
  const reran = Boolean(args.rerun && usable) && !problems.some((p) => p.code === 'rerun-failed');
  // The last line agrees with the exit code: an identical re-run of a manifest that failed another check is not "identical".
  const errors = problems.filter((q) => q.severity === 'error' && q.code !== 'rerun-failed');
  const reasons = [...new Set(errors.map((q) => q.code))].join(', ');
  const final =
    reran && differences.length
      ? verdict(differences)
      : errors.length
        ? `not verified (${reasons})${reran ? '; the re-run itself was identical' : ''}`
        : reran
          ? verdict(differences)
          : failed
            ? 'not verified'
            : 'verified';
  if (args.format === 'json') {
    io.out(
      JSON.stringify(
        {
          verdict: final,
          'signed-by': check.signedBy ?? null,
          'ssh-fingerprint': check.ssh?.fingerprint ?? null,
          principals: check.ssh?.principals ?? null,
          pinned: check.pinned,
          problems,
          differences,
        },
        null,
        2,
      ) + '\n',
    );
  } else {
    reportProblems(io, problems, 'text');
    for (const d of differences) io.out(`  ${d.kind}: ${d.message}\n`);
    io.out(lines.map((l) => l + '\n').join('') + final + '\n');
  }
  return failed ? 1 : 0;
}

async function checkSiblings(
  m: Manifest & { files: Record<string, string> },
  dir: string,
  strict: boolean,
  problems: Problem[],
): Promise<string> {
  const parts: string[] = [];
  const names = Object.keys(m.files);
  if (names.length && names.every((name) => !existsSync(join(dir, name)))) {
    problems.push(
      error(
        'results-missing',
        `none of the ${names.length} result files the manifest lists (${names.join(', ')}) is next to it, so there is nothing ` +
          `left to vouch for`,
        { file: shown(join(dir, 'manifest.json')), hint: 'verify the manifest inside its results folder' },
      ),
    );
    return names.map((name) => `${name} missing`).join(', ');
  }
  for (const [name, sha] of Object.entries(m.files)) {
    const path = join(dir, name);
    if (!existsSync(path)) {
      problems.push(
        (strict ? error : warning)('file-missing', `${name} is not next to the manifest, so its hash was not checked`, {
          file: shown(path),
        }),
      );
      parts.push(`${name} missing`);
      continue;
    }
    const now = await sha256File(path);
    if (now !== sha)
      problems.push(error('file-hash-mismatch', `${name} has SHA-256 ${now}, not the ${sha} the manifest records`, { file: shown(path) }));
    parts.push(`${name} ${now === sha ? 'ok' : 'CHANGED'}`);
  }
  return parts.join(', ');
}

async function rerunManifest(m: any, args: VerifyArgs, problems: Problem[]): Promise<{ differences: Difference[]; lines: string[] }> {
  const manifestDir = dirname(resolve(args.manifest));
  const access = reviewPolicy(manifestDir, args);
  let doc: any;
  let base: string;
  if (args.protocol) {
    const loaded = await loadProtocol(args.protocol);
    if (!loaded.raw || hasErrors(loaded.problems)) {
      problems.push(...loaded.problems, error('rerun-failed', `the protocol ${args.protocol} cannot be read`));
      return { differences: [], lines: [] };
    }
    doc = structuredClone(loaded.raw);
    base = dirname(resolve(args.protocol));
  } else {
    doc = structuredClone(m.protocol.document);
    base = resolve(manifestDir, m.protocol.location);
  }
  const protocolSha = canonicalSha256(doc);
  const outside = localizeProtocol(doc, base, access, args.data, shown(resolve(args.manifest)));
  if (outside.length) {
    problems.push(
      ...outside,
      error('rerun-failed', 'the re-run would read files outside the review folders, so it was not started', {
        hint: 'pass --data FILE and --protocol FILE with your own copies, or --allow-outside if you trust this manifest',
      }),
    );
    return { differences: [], lines: [] };
  }
  let localSha: string;
  try {
    localSha = await sha256File(doc.data.file);
  } catch (e) {
    problems.push(
      fileProblem(e as NodeJS.ErrnoException, shown(doc.data.file), { file: shown(doc.data.file) }),
      error('rerun-failed', 'the data for the re-run cannot be read', { hint: 'pass --data FILE with a copy of the data' }),
    );
    return { differences: [], lines: [] };
  }
  // A changed data file is itself a difference; the run goes ahead so its effect is visible too.
  doc.data.sha256 = localSha;
  return withProtocolCopy(doc, async (path) => {
    const { report, input, out } = await produceRun(path, {
      refit: await recordedRefit(join(manifestDir, 'models.json')),
      allowCommands: args.allowCommands,
      commandFolder: base,
      access: { ...access, roots: [...access.roots, ...(args.data ? [dirname(resolve(args.data))] : [])] },
    }).catch((e: unknown) => {
      // The re-run's protocol is a temporary copy: a failure names the manifest instead.
      if (e instanceof FoldsealError)
        throw new FoldsealError(
          e.problems.map((q) => ({ ...q, file: shown(resolve(args.manifest)), position: undefined })),
          e.exitCode,
        );
      throw e;
    });
    if (!input || !out) {
      problems.push(
        ...report.problems.filter((p) => p.severity === 'error'),
        error('rerun-failed', 'the protocol did not validate on the local data, so it could not be re-run'),
      );
      return { differences: [], lines: [] };
    }
    const fresh = manifestForRun(input, out, {
      tool: toolInfo(),
      created: '',
      protocolLocation: m.protocol.location,
      validate: schemaValidator(MANIFEST_SCHEMA),
    }).manifest as any;
    fresh.protocol.sha256 = protocolSha;
    const differences = compareRuns(m, fresh, doc.verify?.tolerance ?? 0);
    const recordedPredictions = await readFileOr(join(manifestDir, 'predictions.csv'), '');
    // No sink was given: the re-run's predictions.csv is in memory.
    const bytes = out.predictions!;
    const freshPredictions = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('utf8');
    if (recordedPredictions && recordedPredictions !== freshPredictions) {
      const d = differences.find((x) => x.message.startsWith('predictions.csv'));
      if (d) d.message += `; ${lineDifferences(recordedPredictions, freshPredictions)} lines differ`;
    }
    const n = (m.split.assignment as unknown[]).length;
    const lines = [
      `rerun: ${n} assignments, ${countMetrics(m.results)} metric values and ` +
        `${out.digests['predictions.csv'] === m.files['predictions.csv'] ? 'identical' : 'changed'} predictions ` +
        `compared (tolerance ${doc.verify?.tolerance ?? 0})`,
    ];
    return { differences, lines };
  });
}

/** Whether the recorded run saved a refit model (run --refit), so the re-run does the same. */
async function recordedRefit(modelsPath: string): Promise<boolean> {
  try {
    return Boolean(JSON.parse(await readFileOr(modelsPath, 'null'))?.refit);
  } catch {
    return false;
  }
}

async function readFileOr<T extends string | undefined>(path: string, fallback: T): Promise<string | T> {
  try {
    return await readRegularText(path);
  } catch {
    return fallback;
  }
}

/** The largest manifest foldseal reads (a 1,000,000-row assignment is about 40 MB). */
const MANIFEST_MAX_BYTES = 512 << 20;

function lineDifferences(a: string, b: string): number {
  const x = a.split('\n');
  const y = b.split('\n');
  let n = Math.abs(x.length - y.length);
  for (let i = 0; i < Math.min(x.length, y.length); i++) if (x[i] !== y[i]) n++;
  return n;
}

function countMetrics(results: any): number {
  let n = 0;
  for (const f of results.folds) n += Object.keys(f.metrics).length;
  return n + Object.keys(results.summary).length * 3;
}

function signatureLine(check: ManifestCheck): string {
  if (!check.signedBy) return 'signature: not verified';
  if (check.ssh) {
    const who = check.ssh.principals?.length ? ` (${check.ssh.principals.join(', ')})` : '';
    return (
      `signature: valid SSH signature (manifest.json.sig), signed by ` +
      `${check.ssh.fingerprint}${who}${check.pinned ? '' : ' (key in the signature, not pinned)'}`
    );
  }
  return `signature: valid, signed by ${check.signedBy}${check.pinned ? '' : ' (embedded key, not pinned)'}`;
}
