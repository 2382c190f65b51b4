/** Reads the test vectors out of docs/split-spec.md itself, so the document is what gets checked. */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { root } from '../helpers.js';

export interface SpecVector {
  name: string;
  rule: 'holdout' | 'kfold' | 'stratified-kfold' | 'grouped-kfold' | 'leave-one-out' | 'leave-group-out';
  folds?: number;
  repeats?: number;
  seed?: number;
  assign?: 'balanced' | 'stable';
  'test-fraction'?: number;
  rows: string[][];
  /** An inner split's outer repeat and fold (spec §9); the rows are that outer training part. */
  outer?: [number, number];
  /** The assignment lines, or (for a rejected input) `reject`: the problem code. */
  expected?: string[];
  reject?: string;
}

export function specText(): string {
  return readFileSync(join(root, 'docs', 'split-spec.md'), 'utf8');
}

export function specVectors(): SpecVector[] {
  return [...specText().matchAll(/```json split-vector\n([\s\S]*?)\n```/g)].map((m) => JSON.parse(m[1]) as SpecVector);
}

export function specKeyVectors(): { seed: number; repeat: number; id: string; message: string; key: string }[] {
  const block = /Key derivation vectors \(hex\):\n\n```json\n([\s\S]*?)\n```/.exec(specText())!;
  return block[1].split('\n').map((l) => JSON.parse(l));
}

export function specInnerKeyVectors(): { seed: number; repeat: string; id: string; message: string; key: string }[] {
  const block = /```json inner-keys\n([\s\S]*?)\n```/.exec(specText())!;
  return block[1].split('\n').map((l) => JSON.parse(l));
}
