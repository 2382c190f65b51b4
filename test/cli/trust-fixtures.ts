/** Shared fixtures of the trust tests (trust-output.test.ts, trust-gate.test.ts). */
import { cpSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { root, sha256, smallCsv, tempDir } from '../helpers.js';

export const demoDir = join(root, 'protocols');
export const demoText = readFileSync(join(demoDir, 'demo.yaml'), 'utf8');

/** A project folder holding the demo protocol and its data (no lock, so no team rules). */
export function project(extra: Record<string, string> = {}): string {
  const dir = tempDir(extra);
  cpSync(join(demoDir, 'data'), join(dir, 'data'), { recursive: true });
  writeFileSync(join(dir, 'demo.yaml'), demoText);
  return dir;
}

/** Every file the manifest lists is there with its recorded hash. */
export function complete(dir: string): boolean {
  try {
    const m = JSON.parse(readFileSync(join(dir, 'manifest.json'), 'utf8'));
    return Object.entries(m.files as Record<string, string>).every(([f, h]) => sha256(readFileSync(join(dir, f))) === h);
  } catch {
    return false;
  }
}

export const csv = smallCsv(20);
export const protocolFor = (name: string, data = 'data.csv', dataText = csv) =>
  `foldseal: 1\nname: ${name}\ndata: {file: ${data}, sha256: "${sha256(dataText)}", id: id, label: label, features: [a, b, ` +
  `c]}\nsplit: {rule: stratified-kfold, folds: 2, seed: 7}\nmodel: {kind: gaussian-nb}\n`;
