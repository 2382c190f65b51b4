#!/usr/bin/env node
// Writes the INVENTED demo data of foldseal: a made-up screen of cacao seedlings
// for resistance to a made-up leaf blight. No real plants, sites or measurements.
// Seeded and dependency-free, so `node protocols/data/generate.mjs` always writes
// the same bytes. Run it from anywhere; it writes next to itself.
import { writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { seededRandom } from '../../scripts/seeded-random.mjs';

const here = dirname(fileURLToPath(import.meta.url));

const rand = seededRandom(20261201);
const normal = () => {
  const u = 1 - rand();
  const v = rand();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
};
const fixed = (x, d) => x.toFixed(d);

const trays = Array.from({ length: 12 }, (_, i) => `T${String(i + 1).padStart(2, '0')}`);
const header = [
  'seedling_id',
  'tray',
  'bench',
  'leaf_area_cm2',
  'chlorophyll_spad',
  'lesion_day3_mm',
  'lesion_day7_mm',
  'phenol_index',
  'root_mass_g',
  'stomata_per_mm2',
  'height_cm',
  'resistant',
];

function seedling(id, tray) {
  const resistant = rand() < 0.42;
  const r = resistant ? 1 : 0;
  const trayEffect = (trays.indexOf(tray) - 5.5) * 0.08;
  return [
    id,
    tray,
    `bench-${'ABC'[trays.indexOf(tray) % 3]}`,
    fixed(48 + 6 * normal(), 1), // no signal
    fixed(38 + 4 * normal() + 1.2 * r, 1),
    fixed(Math.max(0, 4.2 - 1.6 * r + trayEffect + 1.1 * normal()), 2),
    fixed(Math.max(0, 11.5 - 4.8 * r + 2 * trayEffect + 2.4 * normal()), 2),
    fixed(0.9 + 0.55 * r + 0.25 * normal(), 3),
    fixed(3.1 + 0.4 * normal(), 2), // no signal
    fixed(210 + 25 * normal() - 8 * r, 0),
    fixed(22 + 3 * normal(), 1), // no signal
    resistant ? 'yes' : 'no',
  ];
}

const rows = [];
for (let i = 1; i <= 120; i++) rows.push(seedling(`CS-${String(i).padStart(4, '0')}`, trays[(i * 7) % 12]));
const csv = (table) => table.map((r) => r.join(',')).join('\n') + '\n';
writeFileSync(join(here, 'seedlings.csv'), csv([header, ...rows]));

// New seedlings to predict after the cross-validation: 16 never seen, plus 4 that were
// in the screen (their held-out predictions are reported for them). No label column.
const fresh = [];
for (let i = 121; i <= 136; i++) fresh.push(seedling(`CS-${String(i).padStart(4, '0')}`, trays[(i * 7) % 12]).slice(0, -1));
const known = [3, 27, 64, 101].map((i) => rows[i - 1].slice(0, -1));
writeFileSync(join(here, 'seedlings-new.csv'), csv([header.slice(0, -1), ...fresh, ...known]));
