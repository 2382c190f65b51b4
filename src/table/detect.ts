/**
 * What `init` works out from a file before writing a protocol: whether the samples are the rows
 * or the columns, and which numeric-looking columns are not measurements (codes and ids such as
 * "01", "02", … "LA"; covariates such as age or batch). Heuristics for a first protocol, never
 * applied silently: init writes what it decided into the protocol, with a comment. Pure.
 */
import type { Grid } from './grid.js';

/** Whether the header (after its first cell) names the sheet's samples: then the samples are the columns. */
export function samplesAreColumns(header: readonly string[], sheetIds: ReadonlySet<string>): boolean {
  if (!sheetIds.size) return false;
  let hits = 0;
  for (let i = 1; i < header.length; i++) if (sheetIds.has(header[i])) hits++;
  return hits >= Math.max(1, Math.min(sheetIds.size, header.length - 1) / 2);
}

/** Column names that, in studies of people, animals or plants, describe the sample rather than measure it (common practice). */
const COVARIATE =
  /^(age|sex|gender|batch|site|centre|center|hospital|date|time|year|visit|race|ethnicity|bmi|weight|height|patient|subject|donor|individual|plate|lane|run|operator|cohort|study)([ _.-]?(id|no|number|code|group|years?))?$/i;

export interface Suspect {
  column: string;
  reason: string;
}

/**
 * Candidate feature columns that should not be features: codes with leading zeros or mixed with
 * text ("01", "02", … "LA"), consecutive whole numbers (an id), and columns named like a
 * covariate. Looks at up to `sample` rows.
 */
export function suspectColumns(g: Grid, candidates: readonly number[], missing: ReadonlySet<string>, sample = 1000): Suspect[] {
  const out: Suspect[] = [];
  const rows = Math.min(g.rows, sample);
  for (const c of candidates) {
    const name = g.header[c];
    if (COVARIATE.test(name)) {
      out.push({ column: name, reason: 'named like a covariate' });
      continue;
    }
    let numbers = 0;
    let texts = 0;
    let leadingZero = 0;
    let integers = 0;
    let consecutive = true;
    let last = Number.NEGATIVE_INFINITY;
    for (let r = 0; r < rows; r++) {
      const text = g.text(r, c);
      if (text === '' || missing.has(text)) continue;
      const v = g.number(r, c);
      if (v !== v) {
        texts++;
        continue;
      }
      numbers++;
      if (last !== Number.NEGATIVE_INFINITY && v !== last + 1) consecutive = false;
      last = v;
      if (/^[+-]?0\d/.test(text)) leadingZero++;
      if (/^[+-]?\d+$/.test(text)) integers++;
    }
    if (numbers === 0) continue;
    if (leadingZero > 0 && (texts > 0 || leadingZero === numbers))
      out.push({ column: name, reason: 'a code (values with leading zeros, like "01")' });
    else if (texts > 0) out.push({ column: name, reason: `a code (numbers mixed with ${texts} text value${texts === 1 ? '' : 's'})` });
    else if (integers === numbers && consecutive && numbers === rows && rows >= 20)
      out.push({ column: name, reason: 'an id (consecutive whole numbers)' });
  }
  return out;
}

/**
 * The layout of a table of new rows for models that read `features`: samples in rows when its
 * header names a feature or the id column; features in rows when instead its first column names
 * features. Undefined when neither holds (the reader then reports the missing columns).
 */
export function newRowsLayout(
  header: readonly string[],
  firstColumn: readonly string[],
  features: readonly string[],
  id: string | undefined,
): 'samples-in-rows' | 'features-in-rows' | undefined {
  const names = new Set(features);
  if ((id !== undefined && header.includes(id)) || header.some((h) => names.has(h))) return 'samples-in-rows';
  if (firstColumn.some((v) => names.has(v))) return 'features-in-rows';
  return undefined;
}
