#!/usr/bin/env node
// Regenerates the committed reference fixtures:
//   1. for each case of cases.json, `foldseal folds` (built binary) → fixtures/<case>.folds.csv
//   2. sklearn_reference.py on those folds (Debian's /usr/bin/python3) → fixtures/<case>.json
// Run after `npm run build`: node test/reference/make-fixtures.mjs
import { execFileSync } from 'node:child_process';
import { mkdtempSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { caseProtocol, referenceDir } from './case-protocol.mjs';

export function exportFolds(outDir) {
  const cases = JSON.parse(readFileSync(join(referenceDir, 'cases.json'), 'utf8'));
  const work = mkdtempSync(join(tmpdir(), 'foldseal-ref-'));
  mkdirSync(outDir, { recursive: true });
  const bin = join(referenceDir, '..', '..', 'dist', 'src', 'cli', 'main.js');
  for (const c of cases) {
    const protocol = join(work, `${c.name}.yaml`);
    writeFileSync(protocol, caseProtocol(c, work));
    execFileSync(process.execPath, [bin, 'folds', protocol, '--allow-outside', '--out', join(outDir, `${c.name}.folds.csv`)], {
      stdio: ['ignore', 'ignore', 'inherit'],
    });
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const fixtures = join(referenceDir, 'fixtures');
  exportFolds(fixtures);
  execFileSync('/usr/bin/python3', [join(referenceDir, 'sklearn_reference.py'), join(referenceDir, 'cases.json'), fixtures, fixtures], {
    stdio: 'inherit',
  });
}
