#!/usr/bin/env node
// Writes the INVENTED expression-matrix demo of foldseal: a made-up leaf transcript panel of the
// made-up cacao seedling screen. No real plants, genes or measurements. Seeded and
// dependency-free: `node protocols/data/generate-expression.mjs` writes the same bytes again
// (the .gz bytes are those of Node's zlib; another zlib version may compress differently, and
// the protocol's sha256 of the compressed file would then need updating).
//   leaf-panel.tsv.gz  features in rows: probe id, then one column per seedling (gzip)
//   leaf-samples.csv   the sample sheet: seedling, response grade, tray, qc
import { writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { gzipSync } from 'node:zlib';
import { seededRandom } from '../../scripts/seeded-random.mjs';

const here = dirname(fileURLToPath(import.meta.url));
const rand = seededRandom(20261202);
const normal = () => Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());

const seedlings = Array.from({ length: 72 }, (_, i) => `LX-${String(i + 1).padStart(2, '0')}`);
// Made-up response grades: R1/R2 resist the made-up blight, S1/S2 do not.
const grades = seedlings.map(() => ['R1', 'R2', 'S1', 'S2'][Math.floor(rand() * 4)]);
const resistant = grades.map((g) => g.startsWith('R'));
const trays = seedlings.map((_, i) => `T${String((i % 9) + 1).padStart(2, '0')}`);
const qc = seedlings.map(() => (rand() < 0.08 ? 'fail' : 'pass'));

const probes = Array.from({ length: 800 }, (_, j) => `lp${String(j + 1).padStart(4, '0')}`);
const lines = [['probe', ...seedlings].join('\t')];
probes.forEach((probe, j) => {
  const base = 6 + 4 * rand();
  const effect = j < 20 ? (j % 2 ? 0.7 : -0.7) : 0;
  lines.push([probe, ...seedlings.map((_, i) => (base + normal() * 0.7 + (resistant[i] ? effect : 0)).toFixed(3))].join('\t'));
});
writeFileSync(join(here, 'leaf-panel.tsv.gz'), gzipSync(Buffer.from(lines.join('\n') + '\n'), { level: 9 }));
writeFileSync(
  join(here, 'leaf-samples.csv'),
  ['seedling,response,tray,qc', ...seedlings.map((s, i) => `${s},${grades[i]},${trays[i]},${qc[i]}`)].join('\n') + '\n',
);
console.log(`wrote leaf-panel.tsv.gz (${probes.length} probes × ${seedlings.length} seedlings) and leaf-samples.csv`);
