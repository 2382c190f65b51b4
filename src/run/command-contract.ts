/**
 * The language-neutral contract between foldseal and a command model (docs/command-models.md),
 * as pure text: the tables and request a program is given, the per-fold seed, and the check of
 * the probabilities it returns. Running the program is the shell's (src/io/command-model.ts).
 */
import { csvCells, numberText } from '../table/csv-write.js';
import { readDelimited, textColumn } from '../table/delimited.js';
import type { Matrix } from '../table/matrix.js';
import { sha256Bytes } from '../util/sha256.js';

export const CONTRACT_VERSION = 'foldseal-command-v1';

/**
 * A fold's seed: the first four bytes of SHA-256("foldseal/model-seed-v1" 0x00 S 0x00 R 0x00 F),
 * read big-endian and halved (0 ≤ seed < 2^31, which R's set.seed and NumPy both take). S is the
 * split seed in ASCII decimal (`pinned` for a pinned split); R, F the repeat and fold (0, 0 for a refit).
 */
export function foldSeed(splitSeed: number | undefined, repeat: number, fold: number): number {
  const hex = sha256Bytes(`foldseal/model-seed-v1\0${splitSeed ?? 'pinned'}\0${repeat}\0${fold}`);
  return Number.parseInt(hex.slice(0, 8), 16) >>> 1;
}

/** A table the program reads: `id`, then `label` (training tables only), then one column per feature, in CSV. */
export function contractCsv(ids: readonly string[], names: readonly string[], X: Matrix, labels?: readonly string[]): string {
  const header = ['id', ...(labels ? ['label'] : []), ...names];
  const idCells = csvCells(ids);
  const labelCells = labels && csvCells(labels);
  const lines = [csvCells(header).join(',')];
  for (let r = 0; r < X.rows; r++) {
    const cells = [idCells[r]];
    if (labelCells) cells.push(labelCells[r]);
    // The shortest decimal that reads back as the same double, as Python's float() and R's as.numeric parse it.
    for (let j = 0; j < X.cols; j++) cells.push(numberText(X.data[r * X.cols + j]));
    lines.push(cells.join(','));
  }
  return lines.join('\n') + '\n';
}

export interface Request {
  contract: typeof CONTRACT_VERSION;
  mode: 'fit' | 'predict';
  /** Class labels in foldseal's order; `proba.csv` has one column `p_<class>` per class, in this order. */
  classes: string[];
  /** The protocol's model.options, as written. */
  options: Record<string, unknown>;
  repeat: number;
  fold: number;
  seed?: number;
  rows: number;
  features: number;
}

export function requestJson(r: Request): string {
  return JSON.stringify(r, null, 2) + '\n';
}

/**
 * The program's `proba.csv` (its bytes) against what was asked: header `id,p_<class>…` in class
 * order, every asked id exactly once, finite probabilities in [0, 1] summing to 1 within 1e-9.
 * The rows come back in the order asked; a message says what is wrong otherwise.
 */
export function readProba(
  bytes: Uint8Array,
  asked: readonly string[],
  classes: readonly string[],
): { proba?: Float64Array; problem?: string } {
  const read = readDelimited(bytes, 0x2c, 'proba.csv');
  const expected = ['id', ...classes.map((c) => `p_${c}`)];
  if (!read.table || read.problems.some((q) => q.severity === 'error')) {
    const q = read.problems[0];
    return { problem: `proba.csv is not a valid table: ${q?.message ?? 'it is empty'}${q?.position ? ` (line ${q.position.line})` : ''}` };
  }
  const t = read.table;
  if (t.header.join('\u0000') !== expected.join('\u0000'))
    return { problem: `proba.csv starts with "${csvCells(t.header).join(',')}", not the header "${csvCells(expected).join(',')}"` };
  const k = classes.length;
  const at = new Map(asked.map((id, i) => [id, i]));
  const proba = new Float64Array(asked.length * k);
  const seen = new Uint8Array(asked.length);
  const ids = textColumn(t, 0);
  const cells = classes.map((_, c) => textColumn(t, c + 1));
  for (let r = 0; r < t.rows; r++) {
    const where = `proba.csv line ${t.rowLine[r]}`;
    const i = at.get(ids[r]);
    if (i === undefined) return { problem: `${where} is for id "${ids[r]}", which was not asked for` };
    if (seen[i]) return { problem: `${where} repeats id "${ids[r]}"` };
    seen[i] = 1;
    let sum = 0;
    for (let c = 0; c < k; c++) {
      const text = cells[c][r];
      const v = text.trim() === '' ? Number.NaN : Number(text);
      if (!Number.isFinite(v) || v < 0 || v > 1) return { problem: `${where}: p_${classes[c]} is "${text}", not a probability in [0, 1]` };
      proba[i * k + c] = v;
      sum += v;
    }
    if (Math.abs(sum - 1) > 1e-9) return { problem: `${where}: the probabilities of "${ids[r]}" sum to ${sum}, not 1 (within 1e-9)` };
  }
  const missing = asked.filter((_, i) => !seen[i]);
  if (missing.length)
    return {
      problem: `proba.csv has no row for ${missing.length} of the ${asked.length} ids asked for (${missing.slice(0, 3).join(', ')}${missing.length > 3 ? ', …' : ''})`,
    };
  return { proba };
}
