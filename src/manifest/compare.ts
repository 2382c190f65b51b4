/** Exact differences between a recorded manifest and a fresh re-run. Pure; the creation time is never compared. */
import type { Manifest } from './build.js';

export interface Difference {
  kind: 'protocol' | 'data' | 'assignment' | 'metric' | 'predictions' | 'file' | 'tool';
  message: string;
}

type Triple = [string, number, number];
const MAX_IDS = 20;

export function compareRuns(recorded: Manifest, fresh: Manifest, tolerance: number): Difference[] {
  const out: Difference[] = [];
  const r = recorded as any;
  const f = fresh as any;
  if (r.protocol.sha256 !== f.protocol.sha256)
    out.push({ kind: 'protocol', message: `protocol SHA-256 ${f.protocol.sha256} differs from the recorded ${r.protocol.sha256}` });
  if (r.data.sha256 !== f.data.sha256)
    out.push({ kind: 'data', message: `data SHA-256 ${f.data.sha256} differs from the recorded ${r.data.sha256}` });
  out.push(...assignmentDifferences(r.split.assignment as Triple[], f.split.assignment as Triple[]));
  out.push(...metricDifferences(r.results, f.results, tolerance));
  for (const name of ['predictions.csv', 'applied.csv'] as const) {
    if (r.files[name] !== f.files[name])
      out.push({
        kind: 'predictions',
        message: `${name} differs (SHA-256 ${f.files[name] ?? 'absent'} now, ${r.files[name] ?? 'absent'} recorded)`,
      });
  }
  // Fitted numbers may move in their last digits between foldseal versions; folds (split-v1) never do.
  const fitted = out.some((d) => d.kind === 'metric' || d.kind === 'predictions');
  if (fitted && r.tool?.version !== f.tool?.version) {
    out.push({
      kind: 'tool',
      message:
        `recorded with foldseal ${r.tool?.version}, re-run with ${f.tool?.version}: fitted values can differ in their last ` +
        `digits between versions (a split-v1 assignment cannot); set verify.tolerance, or re-run with the recorded version`,
    });
  }
  return out;
}

function assignmentDifferences(recorded: Triple[], fresh: Triple[]): Difference[] {
  const key = (t: Triple) => `${t[1]}\u0000${t[0]}`;
  const now = new Map(fresh.map((t) => [key(t), t[2]]));
  const moved: string[] = [];
  let missing = 0;
  for (const t of recorded) {
    const fold = now.get(key(t));
    if (fold === undefined) missing++;
    else if (fold !== t[2]) moved.push(`${t[0]} (repeat ${t[1]}: fold ${t[2]} → ${fold})`);
  }
  const added = fresh.length - (recorded.length - missing);
  const out: Difference[] = [];
  if (moved.length)
    out.push({
      kind: 'assignment',
      message:
        `${moved.length} id${moved.length === 1 ? '' : 's'} moved to another fold: ` +
        `${moved.slice(0, MAX_IDS).join(', ')}${moved.length > MAX_IDS ? ', …' : ''}`,
    });
  if (missing || added) out.push({ kind: 'assignment', message: `${missing} recorded assignments are missing now and ${added} are new` });
  return out;
}

function metricDifferences(recorded: any, fresh: any, tolerance: number): Difference[] {
  const out: Difference[] = [];
  const differs = (a: number | null, b: number | null) => (a === null || b === null ? a !== b : Math.abs(a - b) > tolerance);
  const show = (v: number | null) => (v === null ? 'undefined' : String(v));
  const freshFolds = new Map((fresh.folds as any[]).map((x) => [`${x.repeat}/${x.fold}`, x]));
  for (const fold of recorded.folds as any[]) {
    const now = freshFolds.get(`${fold.repeat}/${fold.fold}`);
    for (const [m, v] of Object.entries(fold.metrics as Record<string, number | null>)) {
      const w = now?.metrics?.[m] ?? null;
      if (!now || differs(v, w))
        out.push({ kind: 'metric', message: `repeat ${fold.repeat} fold ${fold.fold} ${m}: ${show(w)} now, ${show(v)} recorded` });
    }
  }
  for (const [m, s] of Object.entries(recorded.summary as Record<string, Record<string, number | null>>)) {
    for (const stat of ['mean', 'sd', 'pooled']) {
      const w = fresh.summary?.[m]?.[stat] ?? null;
      if (differs(s[stat], w)) out.push({ kind: 'metric', message: `summary ${m} ${stat}: ${show(w)} now, ${show(s[stat])} recorded` });
    }
  }
  return out;
}

export function verdict(differences: readonly Difference[]): string {
  if (differences.length === 0) return 'identical';
  const count = (k: Difference['kind']) => differences.filter((d) => d.kind === k).length;
  const parts: string[] = [];
  if (count('protocol')) parts.push('protocol');
  if (count('data')) parts.push('data');
  const moved = differences.find((d) => d.kind === 'assignment' && /moved/.test(d.message));
  if (count('assignment')) parts.push(moved ? `assignment (${moved.message.split(' ')[0]} ids)` : 'assignment');
  if (count('metric')) parts.push(`metrics (${count('metric')} values)`);
  if (count('predictions')) parts.push('predictions');
  if (count('file')) parts.push(`files (${count('file')})`);
  if (count('tool')) parts.push('foldseal version');
  return `differs: ${parts.join(', ')}`;
}
