/**
 * Sharded runs: the work of a protocol cut into units (each (repeat, fold) fit, each permutation of
 * a permutation test), dealt round-robin to N shards, and put back together into exactly what one
 * run computes. A part is JSON: what it covers (protocol, data and assignment hashes, tool version,
 * shard I of N, its unit names) and the unit results, typed arrays tagged so that every number
 * round-trips bit for bit. Pure.
 */
import { error, type Problem } from '../problems/problem.js';
import type { FoldFit } from './fit-fold.js';

export const SHARD_VERSION = 1;

export type Unit = { kind: 'fold'; index: number; repeat: number; fold: number } | { kind: 'permutation'; index: number };

export function unitName(u: Unit): string {
  return u.kind === 'fold' ? `fold ${u.repeat}/${u.fold}` : `permutation ${u.index}`;
}

/** Every unit of a run, in a fixed order: the fold fits in report order, then permutations 1…count. */
export function workUnits(plans: readonly { repeat: number; fold: number }[], permutations: number): Unit[] {
  return [
    ...plans.map((p, index) => ({ kind: 'fold' as const, index, repeat: p.repeat, fold: p.fold })),
    ...Array.from({ length: permutations }, (_, i) => ({ kind: 'permutation' as const, index: i + 1 })),
  ];
}

/** Shard `index` (1-based) of `count`: units index − 1, index − 1 + count, … (round-robin balances folds and permutations). */
export function unitsOfShard(units: readonly Unit[], index: number, count: number): Unit[] {
  return units.filter((_, i) => i % count === index - 1);
}

/** "I/N" → {index, count}, or undefined when it is not two integers with 1 ≤ I ≤ N. */
export function parseShard(text: string): { index: number; count: number } | undefined {
  const m = /^(\d+)\/(\d+)$/.exec(text.trim());
  if (!m) return undefined;
  const index = Number(m[1]);
  const count = Number(m[2]);
  return index >= 1 && index <= count ? { index, count } : undefined;
}

export interface ShardCover {
  'protocol-sha256': string;
  'data-sha256': string;
  'assignment-sha256': string;
  tool: string;
  shard: { index: number; count: number };
  units: string[];
}

export interface ShardPart extends ShardCover {
  'foldseal-shard': typeof SHARD_VERSION;
  fits: { unit: string; pipeline: unknown; model: unknown; proba: unknown; search?: unknown }[];
  permutations: { unit: string; score: number | null }[];
}

const TYPED: Record<string, (v: number[]) => ArrayLike<number>> = {
  f64: (v) => Float64Array.from(v, (x) => (typeof x === 'number' ? x : Number((x as { $num: string }).$num))),
  i32: (v) => Int32Array.from(v),
  u8: (v) => Uint8Array.from(v),
};

/** A number JSON cannot hold as itself (NaN, ±Infinity, −0) as {"$num": "…"}. */
function plainNumber(x: number): number | { $num: string } {
  if (Object.is(x, -0)) return { $num: '-0' };
  return Number.isFinite(x) ? x : { $num: String(x) };
}

/** JSON with typed arrays as {"$f64": […]} (and i32, u8); NaN, ±Infinity and −0 as {"$num": "NaN"}. */
export function encodePart(part: ShardPart): string {
  return JSON.stringify(part, function (key, v) {
    // The replacer sees a number after toJSON: read the holder's own value to keep −0.
    const own = (this as Record<string, unknown>)[key];
    if (own instanceof Float64Array) return { $f64: Array.from(own, plainNumber) };
    if (own instanceof Int32Array) return { $i32: Array.from(own) };
    if (own instanceof Uint8Array) return { $u8: Array.from(own) };
    if (typeof own === 'number') return plainNumber(own);
    return v;
  });
}

export function decodePart(text: string): ShardPart {
  return JSON.parse(text, (_, v) => {
    if (v && typeof v === 'object' && !Array.isArray(v)) {
      if ('$num' in v) return Number(v.$num);
      for (const [tag, make] of Object.entries(TYPED)) if (`$${tag}` in v) return make(v[`$${tag}`]);
    }
    return v;
  });
}

export interface Merged {
  fits?: FoldFit[];
  permuted?: Float64Array;
  problems: Problem[];
}

/**
 * The parts of one run → the fold fits in plan order and the permuted scores; or problems naming
 * a part that belongs to another protocol, data or assignment, units no part covers, and units
 * covered twice.
 */
export function mergeParts(
  parts: readonly { file: string; part: ShardPart }[],
  expected: Omit<ShardCover, 'shard' | 'units' | 'tool'>,
  units: readonly Unit[],
): Merged {
  const problems: Problem[] = [];
  const keys = ['protocol-sha256', 'data-sha256', 'assignment-sha256'] as const;
  const what = { 'protocol-sha256': 'protocol', 'data-sha256': 'data', 'assignment-sha256': 'fold assignment' };
  const own = parts.filter(({ file, part }) => {
    if (part['foldseal-shard'] !== SHARD_VERSION) {
      problems.push(
        error('shard-foreign', `${file} is not a foldseal shard part (format ${JSON.stringify(part['foldseal-shard'])})`, { file }),
      );
      return false;
    }
    const differs = keys.filter((k) => part[k] !== expected[k]);
    if (differs.length)
      problems.push(
        error(
          'shard-foreign',
          `${file} belongs to another run: its ${differs.map((k) => what[k]).join(' and ')} ${differs.length === 1 ? 'differs' : 'differ'}`,
          {
            file,
            hint: 'merge only the parts of one protocol run on one data file',
          },
        ),
      );
    return differs.length === 0;
  });
  const fitOf = new Map<string, { file: string; fit: FoldFit }>();
  const scoreOf = new Map<string, { file: string; score: number }>();
  // Units a part repeats, counted per (earlier part, later part).
  const repeated = new Map<string, { first: string; file: string; units: string[] }>();
  for (const { file, part } of own) {
    const seen = (unit: string) => {
      const before = fitOf.get(unit)?.file ?? scoreOf.get(unit)?.file;
      if (before === undefined) return false;
      const key = `${before}\n${file}`;
      const entry = repeated.get(key) ?? { first: before, file, units: [] };
      entry.units.push(unit);
      repeated.set(key, entry);
      return true;
    };
    for (const f of part.fits)
      if (!seen(f.unit))
        fitOf.set(f.unit, {
          file,
          fit: {
            pipeline: f.pipeline as FoldFit['pipeline'],
            model: f.model,
            proba: f.proba as Float64Array,
            ...(f.search ? { search: f.search as FoldFit['search'] } : {}),
          },
        });
    for (const s of part.permutations) if (!seen(s.unit)) scoreOf.set(s.unit, { file, score: s.score ?? Number.NaN });
  }
  for (const { first, file, units: twice } of repeated.values())
    problems.push(
      error(
        'shard-duplicate',
        `${file} repeats ${twice.length} work unit${twice.length === 1 ? '' : 's'} of ${first === file ? 'itself (given twice)' : first} (${twice.slice(0, 3).join(', ')}${twice.length > 3 ? ', …' : ''})`,
        { file, hint: 'give each shard I/N once' },
      ),
    );
  // Positions of the units no part covers (a unit's position gives its shard: round-robin).
  const uncovered = units.flatMap((u, i) => (fitOf.has(unitName(u)) || scoreOf.has(unitName(u)) ? [] : [i]));
  const missing = uncovered.map((i) => unitName(units[i]));
  if (missing.length) {
    const count = own[0]?.part.shard.count;
    const which = count ? [...new Set(uncovered.map((i) => `${(i % count) + 1}/${count}`))].join(', ') : '';
    problems.push(
      error(
        'shard-missing',
        `${missing.length} of ${units.length} work units are in no part (${missing.slice(0, 5).join(', ')}${missing.length > 5 ? ', …' : ''})`,
        {
          hint: which ? `run the shard${which.includes(',') ? 's' : ''} ${which} and merge again` : 'give the parts of every shard',
        },
      ),
    );
  }
  if (problems.length) return { problems };
  const folds = units.filter((u) => u.kind === 'fold');
  const perms = units.filter((u) => u.kind === 'permutation');
  return {
    fits: folds.map((u) => fitOf.get(unitName(u))!.fit),
    permuted: perms.length ? Float64Array.from(perms, (u) => scoreOf.get(unitName(u))!.score) : undefined,
    problems,
  };
}
