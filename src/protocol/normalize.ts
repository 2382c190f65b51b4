/** Schema-valid plain data → typed Protocol with defaults. Runs only after the schema passed. */
import { readStep } from '../preprocess/registry.js';
import { liftGrid } from './grid.js';
import { DEFAULT_METRICS, DEFAULT_MISSING, type PreprocessStep, type Protocol } from './types.js';

/* eslint-disable @typescript-eslint/no-explicit-any */
export function normalizeProtocol(raw: any): Protocol {
  const d = raw.data;
  const s = raw.split ?? {};
  const split: Protocol['split'] = s.pinned
    ? { pinned: { file: s.pinned.file, sha256: s.pinned.sha256 } }
    : {
        rule: s.rule,
        folds: s.folds ?? 5,
        repeats: s.repeats ?? 1,
        seed: s.seed,
        assign: s.assign ?? 'balanced',
        testFraction: s['test-fraction'],
      };
  // A command model's options go to its program as written: a list there is a value, not candidates.
  const command = raw.model.kind === 'command';
  const lifted = liftGrid((raw.preprocess ?? []).map(readStep), command ? {} : (raw.model.options ?? {}));
  const c = raw.model.command;
  const preprocess: PreprocessStep[] = lifted.preprocess;
  const t = raw.tune;
  const inner = t?.split;
  const r = raw.reconcile ?? {};
  const nr = r['new-rows'];
  return {
    foldseal: 1,
    name: raw.name,
    description: raw.description,
    final: raw.final ?? false,
    data: {
      file: d.file,
      sha256: d.sha256,
      format: d.format,
      layout: d.layout ?? 'samples-in-rows',
      samples: d.samples
        ? { file: d.samples.file, sha256: d.samples.sha256, format: d.samples.format, unmatched: d.samples.unmatched ?? 'error' }
        : undefined,
      id: d.id,
      label: d.label,
      positive: d.positive,
      group: d.group,
      features: d.features,
      missing: d.missing ?? DEFAULT_MISSING,
      where: d.where,
      classes: d.classes,
    },
    split,
    preprocess,
    model: {
      kind: raw.model.kind,
      options: command ? (raw.model.options ?? {}) : lifted.options,
      ...(c ? { command: { run: c.run, files: c.files, timeLimit: c['time-limit'] ?? 3600 } } : {}),
    },
    reconcile: {
      rule: r.rule ?? 'mean-probability',
      tie: r.tie,
      newRows: nr ? { file: nr.file, sha256: nr.sha256, id: nr.id, layout: nr.layout ?? 'samples-in-rows' } : undefined,
    },
    metrics: raw.metrics ?? DEFAULT_METRICS,
    grid: lifted.grid,
    tune: t
      ? {
          split: {
            rule: inner.rule,
            folds: inner.folds ?? 5,
            repeats: inner.repeats ?? 1,
            // The inner seed defaults to the outer split's (docs/protocol.md); a pinned outer split has none to lend.
            seed: inner.seed ?? (s.pinned ? undefined : s.seed),
            assign: inner.assign ?? 'balanced',
            testFraction: inner['test-fraction'],
          },
          metric: t.metric,
          prefer: t.prefer.map((entry: Record<string, string>) => {
            const [name, order] = Object.entries(entry)[0];
            return { name, order };
          }),
        }
      : undefined,
    statistics: raw.statistics
      ? {
          level: raw.statistics.level ?? 0.95,
          bootstrap: raw.statistics.bootstrap,
          permutation: raw.statistics.permutation && { within: 'all', ...raw.statistics.permutation },
        }
      : undefined,
    verify: { tolerance: raw.verify?.tolerance ?? 0 },
  };
}
