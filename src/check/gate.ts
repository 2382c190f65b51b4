/**
 * The repository gate: every finding of `foldseal check`, as data. Pure — the shell reads the
 * protocols, the lock, the sealed list and the manifests and hands them in.
 */
import { error, warning, type Problem } from '../problems/problem.js';
import { locate, type SourceDocument } from '../protocol/document.js';
import { isPinned } from '../protocol/types.js';
import type { ValidationReport } from '../protocol/report.js';
import { rawFingerprint, type ManifestCheck } from '../manifest/check.js';
import { parseKeyLines } from '../manifest/ssh.js';
import { AUDIT_KINDS, kindOfCode } from '../audit/kinds.js';
import { lockPosition, type LockEntry, type ParsedLock } from './lock.js';
import { rowDigests } from '../table/row-digest.js';
import { splitRules } from '../split/registry.js';

export interface ProtocolState {
  /** Path relative to the checked folder, with forward slashes (the lock's key). */
  path: string;
  report: ValidationReport;
  /** The entry as it would be locked now (valid protocols only). */
  entry?: LockEntry;
  /** The protocol's audit findings, when the lock's policy forbids some leaks (valid protocols only). */
  audit?: Problem[];
}

export interface GateInput {
  protocols: ProtocolState[];
  lock?: ParsedLock;
  lockFile: string;
  /** Sealed ids, and the content digests of sealed rows (recorded in the lock and found in the data now). */
  sealed?: { ids: Set<string>; file: string; digests?: Set<string> };
  manifests: { file: string; check: ManifestCheck }[];
  /** Only these protocol paths are reported on (for --staged); lock-wide findings still apply to them. */
  only?: Set<string>;
}

const LIST = 5;

export function gate(g: GateInput): Problem[] {
  const out: Problem[] = [];
  const inScope = (path: string) => !g.only || g.only.has(path);
  const lock = g.lock?.lock;
  const lockAt = (path: (string | number)[]) => ({
    file: g.lockFile,
    position: g.lock?.text ? lockPosition(g.lock.text, path) : undefined,
  });
  for (const s of g.protocols) if (inScope(s.path)) out.push(...s.report.problems);

  const byName = new Map<string, ProtocolState[]>();
  for (const s of g.protocols)
    if (s.report.protocol) byName.set(s.report.protocol.name, [...(byName.get(s.report.protocol.name) ?? []), s]);
  for (const [name, list] of byName) {
    if (list.length < 2) continue;
    for (const s of list.slice(1))
      if (inScope(s.path)) out.push(error('duplicate-name', `protocol name "${name}" is also used by ${list[0].path}`, at(s, ['name'])));
  }

  if (!lock) {
    if (!g.lock)
      out.push(
        warning('lock-missing', 'there is no foldseal.lock.json, so splits are not pinned', {
          file: g.lockFile,
          hint: 'run foldseal lock to record the current protocols',
        }),
      );
  } else {
    for (const [path] of Object.entries(lock.protocols)) {
      if (!g.protocols.some((s) => s.path === path) && (!g.only || g.only.has(path)))
        out.push(
          error('lock-stale', `the lock names ${path}, which no longer exists`, {
            ...lockAt(['protocols', path]),
            hint: 'run foldseal lock to drop it, deliberately',
          }),
        );
    }
    for (const s of g.protocols) {
      if (!inScope(s.path) || !s.entry) continue;
      const locked = lock.protocols[s.path];
      if (!locked) {
        out.push(
          error('lock-unlisted', `${s.path} is not in the lock`, {
            ...at(s, ['name']),
            hint: 'run foldseal lock to accept it (the change is then reviewable in the lock)',
          }),
        );
        continue;
      }
      out.push(...drift(s, locked));
    }
  }

  if (g.sealed) out.push(...sealedFindings(g, inScope));
  if (lock?.policy) out.push(...policyFindings(g, inScope));
  return out;
}

function at(s: ProtocolState, path: (string | number)[]): Partial<Problem> {
  const source = s.report.source as SourceDocument | undefined;
  return { file: s.report.file, position: source ? locate(source, path) : undefined };
}

function drift(s: ProtocolState, locked: LockEntry): Problem[] {
  const out: Problem[] = [];
  const now = s.entry!;
  if (now.split.seed !== locked.split.seed)
    out.push(
      error('seed-changed', `the seed changed from ${locked.split.seed} to ${now.split.seed} without a lock update`, {
        ...at(s, ['split', 'seed']),
        hint: 'changing the seed after seeing scores is seed-shopping; if it is deliberate, record it with foldseal lock',
      }),
    );
  if (now.split.rule !== locked.split.rule || now.split.pinned !== locked.split.pinned)
    out.push(
      error(
        'rule-changed',
        `the split changed from ${locked.split.rule ?? `pinned ${locked.split.pinned}`} to ` +
          `${now.split.rule ?? `pinned ${now.split.pinned}`} without a lock update`,
        at(s, now.split.rule ? ['split', 'rule'] : ['split']),
      ),
    );
  if (now['data-sha256'] !== locked['data-sha256'])
    out.push(
      error('data-drift', `the data changed: SHA-256 ${now['data-sha256']}, locked ${locked['data-sha256']}`, at(s, ['data', 'sha256'])),
    );
  if (now['assignment-sha256'] !== locked['assignment-sha256']) {
    const moved = Object.entries(locked.assignment)
      .filter(([id, f]) => now.assignment[id] !== undefined && now.assignment[id] !== f)
      .map(([id]) => id);
    const added = Object.keys(now.assignment).filter((id) => !(id in locked.assignment)).length;
    const removed = Object.keys(locked.assignment).filter((id) => !(id in now.assignment)).length;
    const parts = [
      `${moved.length} id${moved.length === 1 ? '' : 's'} moved to another ` +
        `fold${moved.length ? ` (${moved.slice(0, LIST).join(', ')}${moved.length > LIST ? ', …' : ''})` : ''}`,
    ];
    if (added || removed) parts.push(`${added} added, ${removed} removed`);
    out.push(error('split-drift', `split drift in ${now.name}: ${parts.join('; ')}`, at(s, ['split'])));
  }
  const otherChange = now['protocol-sha256'] !== locked['protocol-sha256'] && out.length === 0;
  if (otherChange)
    out.push(
      error('protocol-changed', `${s.path} changed since it was locked`, {
        ...at(s, ['name']),
        hint: 'review the change, then record it with foldseal lock',
      }),
    );
  return out;
}

/** Content digests of the rows whose id is sealed, over every protocol's data (what `lock` records). */
export function sealedDigests(protocols: readonly ProtocolState[], sealed: Set<string>): Set<string> {
  const out = new Set<string>();
  for (const s of protocols) {
    const t = s.report.table;
    if (!t) continue;
    const rows = t.ids.flatMap((id, r) => (sealed.has(id) ? [r] : []));
    for (const d of rowDigests(t, rows)) out.add(d);
  }
  return out;
}

export function sealedFindings(g: Pick<GateInput, 'protocols' | 'sealed'>, inScope: (p: string) => boolean = () => true): Problem[] {
  const out: Problem[] = [];
  const sealed = g.sealed!.ids;
  const digests = new Set([...(g.sealed!.digests ?? []), ...sealedDigests(g.protocols, sealed)]);
  for (const s of g.protocols) {
    const p = s.report.protocol;
    const t = s.report.table;
    if (!inScope(s.path) || !p || !t) continue;
    const present = t.ids.filter((id) => sealed.has(id));
    if (!p.final) {
      if (present.length)
        out.push(
          error(
            'sealed-rows-used',
            `${p.name} uses ${present.length} sealed id${present.length === 1 ? '' : 's'} from ${p.data.file} (reserved for the ` +
              `final evaluation): ${present.slice(0, LIST).join(', ')}${present.length > LIST ? ', …' : ''}`,
            { ...at(s, ['data', 'file']), hint: 'remove the sealed rows from this data, or mark the final protocol with final: true' },
          ),
        );
      if (digests.size) {
        const rowDigest = rowDigests(t);
        const copied = t.ids.filter((id, r) => !sealed.has(id) && digests.has(rowDigest[r]));
        if (copied.length)
          out.push(
            error(
              'sealed-rows-copied',
              `${p.name} has ${copied.length} row${copied.length === 1 ? '' : 's'} in ${p.data.file} with the same label and ` +
                `feature values as sealed rows, under other ids: ${copied.slice(0, LIST).join(', ')}${copied.length > LIST ? ', …' : ''}`,
              { ...at(s, ['data', 'file']), hint: 'sealed rows stay sealed under a new id; remove them from this data' },
            ),
          );
      }
      continue;
    }
    const holdoutLike = isPinned(p.split) || splitRules[p.split.rule].tests === 'fold-1';
    if (!holdoutLike) {
      out.push(
        error(
          'final-not-holdout',
          `final protocol ${p.name} must test on the sealed rows with a holdout or pinned split`,
          at(s, ['split']),
        ),
      );
      continue;
    }
    const a = s.report.assignment;
    if (!a) continue;
    const test = new Set(a.ids.filter((_, row) => a.fold[row] === 1));
    const inData = new Set(present);
    const missing = [...sealed].filter((id) => inData.has(id) && !test.has(id));
    const extra = [...test].filter((id) => !sealed.has(id));
    if (missing.length || extra.length || present.length === 0)
      out.push(
        error(
          'final-test-mismatch',
          `the test part (fold 1) of final protocol ${p.name} must be exactly the sealed ids: ${missing.length} sealed ids are ` +
            `not in it, ${extra.length} other ids are${present.length === 0 ? '; the data has no sealed id' : ''}`,
          at(s, ['split']),
        ),
      );
  }
  return out;
}

function policyFindings(g: GateInput, inScope: (p: string) => boolean): Problem[] {
  const policy = g.lock!.lock!.policy!;
  const out: Problem[] = [];
  for (const s of g.protocols) {
    const p = s.report.protocol;
    if (!inScope(s.path) || !p) continue;
    if (policy['require-pinned-or-stable'] && !isPinned(p.split) && p.split.assign !== 'stable')
      out.push(
        error(
          'policy-unpinned',
          `${p.name} neither pins its split nor uses assign: stable, which the lock's policy requires`,
          at(s, ['split']),
        ),
      );
    if (policy['forbid-tolerance'] && p.verify.tolerance > 0)
      out.push(
        error(
          'policy-tolerance',
          `${p.name} allows re-run differences up to ${p.verify.tolerance}; the lock's policy requires exact agreement`,
          at(s, ['verify', 'tolerance']),
        ),
      );
    const forbidden = new Set(policy['forbid-leaks'] ?? []);
    for (const f of s.audit ?? []) {
      const kind = kindOfCode(f.code);
      if (f.severity === 'warning' && kind && forbidden.has(kind))
        out.push(
          error('policy-leak', `${p.name}: ${f.message} (the lock's policy forbids ${kind})`, {
            file: f.file,
            position: f.position,
            hint: f.hint,
          }),
        );
    }
  }
  for (const kind of policy['forbid-leaks'] ?? [])
    if (!(AUDIT_KINDS as readonly string[]).includes(kind))
      out.push(
        error('policy-leak', `the lock's policy.forbid-leaks names "${kind}", which is not a kind of audit finding`, {
          file: g.lockFile,
          hint: `known kinds: ${AUDIT_KINDS.join(', ')}`,
        }),
      );
  if (policy.signers) {
    for (const m of g.manifests) {
      const by = m.check.signedBy;
      if (!by)
        out.push(
          error('policy-unsigned', 'this manifest has no valid signature, and the lock requires one', {
            file: m.file,
            hint: `sign with foldseal run --key; allowed signers: ${policy.signers.join(', ')}`,
          }),
        );
      else if (!policy.signers.some((s) => signerMatches(s, by, m.check.sshFingerprint)))
        out.push(error('policy-signer', `this manifest is signed by ${by}, which is not an allowed signer in the lock`, { file: m.file }));
    }
  }
  return out;
}

/**
 * A policy signer: the hex fingerprint foldseal keygen prints, OpenSSH's `SHA256:…` fingerprint,
 * or an OpenSSH public key line (as in an allowed_signers file, principals first or not).
 */
export function signerMatches(entry: string, hex: string, sshFp: string | undefined): boolean {
  const e = entry.trim();
  if (e === hex || (sshFp !== undefined && e === sshFp)) return true;
  return parseKeyLines(e).keys.some((k) => k.key.raw !== undefined && rawFingerprint(k.key.raw) === hex);
}
