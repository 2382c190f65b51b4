// Turns a reference case (cases.json) into foldseal protocol text. Shared by the fixture
// maker (split by rule) and the tests (split pinned to the exported folds).
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join, relative } from 'node:path';

export const referenceDir = new URL('.', import.meta.url).pathname;

export function caseProtocol(c, protocolDir, pinnedFile) {
  const dataPath = join(referenceDir, c.data);
  const sha = createHash('sha256').update(readFileSync(dataPath)).digest('hex');
  const lines = [
    'foldseal: 1',
    `name: ${c.name}`,
    'data:',
    `  file: ${JSON.stringify(relative(protocolDir, dataPath))}`,
    `  sha256: "${sha}"`,
    '  id: id',
    `  label: ${c.label}`,
    ...(c.positive ? [`  positive: ${c.positive}`] : []),
  ];
  if (pinnedFile) {
    const pinSha = createHash('sha256').update(readFileSync(pinnedFile)).digest('hex');
    lines.push('split:', '  pinned:', `    file: ${JSON.stringify(relative(protocolDir, pinnedFile))}`, `    sha256: "${pinSha}"`);
  } else {
    lines.push(`split: ${JSON.stringify(c.split)}`);
  }
  if (c['new-rows']) {
    const newPath = join(referenceDir, c['new-rows']);
    const newSha = createHash('sha256').update(readFileSync(newPath)).digest('hex');
    lines.push(
      `reconcile: {rule: ${c.rule ?? 'mean-probability'}, ${c.tie ? `tie: ${c.tie}, ` : ''}new-rows: {file: ${JSON.stringify(relative(protocolDir, newPath))}, sha256: "${newSha}"}}`,
    );
  }
  lines.push(`preprocess: ${JSON.stringify(c.preprocess)}`, `model: ${JSON.stringify(c.model)}`, `metrics: ${JSON.stringify(c.metrics)}`);
  return lines.join('\n') + '\n';
}
