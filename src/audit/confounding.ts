/**
 * Covariates of the sample sheet (batch, site, date, …) that go with the label. A batch that
 * coincides with the class lets a model score by recognising the batch: the cross-validated
 * score is then the batch effect's, and will not hold in a new batch. Pure.
 */
import { warning, type Problem } from '../problems/problem.js';
import { gammaQ } from '../stats/special.js';
import { isNumberText } from '../table/number.js';
import { AUDIT_CODE } from './kinds.js';
import type { AuditInput } from './input.js';
import { pairwiseSeparation } from './separation.js';
import { AUDIT_THRESHOLDS } from './thresholds.js';

export interface Association {
  /** Pearson's chi-square statistic of the levels × classes table. */
  chiSquare: number;
  df: number;
  /** Upper tail of the chi-square distribution with df degrees of freedom. */
  p: number;
  /** Cramér's V = sqrt(χ² / (n · (min(levels, classes) − 1))). */
  cramerV: number;
  n: number;
}

/** The chi-square test of independence and Cramér's V of two categorical codings (−1 = missing, left out). */
export function association(a: Int32Array, levels: number, y: Int32Array, classes: number): Association | null {
  const table = new Float64Array(levels * classes);
  let n = 0;
  for (let i = 0; i < a.length; i++) {
    if (a[i] < 0) continue;
    table[a[i] * classes + y[i]]++;
    n++;
  }
  const rowSum = new Float64Array(levels);
  const colSum = new Float64Array(classes);
  for (let l = 0; l < levels; l++)
    for (let c = 0; c < classes; c++) {
      rowSum[l] += table[l * classes + c];
      colSum[c] += table[l * classes + c];
    }
  const usedRows = rowSum.filter((v) => v > 0).length;
  const usedCols = colSum.filter((v) => v > 0).length;
  if (usedRows < 2 || usedCols < 2) return null;
  let chi = 0;
  for (let l = 0; l < levels; l++) {
    if (!rowSum[l]) continue;
    for (let c = 0; c < classes; c++) {
      if (!colSum[c]) continue;
      const expected = (rowSum[l] * colSum[c]) / n;
      const d = table[l * classes + c] - expected;
      chi += (d * d) / expected;
    }
  }
  const df = (usedRows - 1) * (usedCols - 1);
  const p = gammaQ(df / 2, chi / 2);
  const cramerV = Math.sqrt(chi / (n * (Math.min(usedRows, usedCols) - 1)));
  return { chiSquare: chi, df, p: Math.max(0, p), cramerV: Math.min(1, cramerV), n };
}

export function confoundingFindings(input: AuditInput): Problem[] {
  const { table, protocol: p } = input;
  const missing = new Set(['', ...p.data.missing]);
  const t = AUDIT_THRESHOLDS;
  const out: Problem[] = [];
  for (const c of input.described.covariates) {
    const present = c.values.filter((v) => !missing.has(v));
    const levels = [...new Set(present)].sort();
    if (levels.length < 2) continue;
    const { file, line, col } = c.at;
    const at = { file, position: { line, col } };
    if (levels.length <= Math.min(t.maxCategories, table.ids.length / 2)) {
      const code = new Map(levels.map((v, i) => [v, i]));
      const coded = Int32Array.from(c.values, (v) => code.get(v) ?? -1);
      const a = association(coded, levels.length, table.y, table.classes.length);
      if (!a || a.cramerV < t.cramerV || a.p >= t.chiSquareP) continue;
      out.push(
        warning(
          AUDIT_CODE.confounded,
          `covariate "${c.name}" goes with the label: Cramér's V ${a.cramerV.toFixed(3)} ≥ ${t.cramerV}, ` +
            `chi-square ${a.chiSquare.toFixed(2)} on ${a.df} df, p = ${a.p.toPrecision(3)} < ${t.chiSquareP} (${a.n} rows)`,
          {
            ...at,
            hint: `a model can score by recognising the ${c.name}; check the score within one ${c.name}, or split by it (data.group)`,
          },
        ),
      );
    } else if (present.every(isNumberText)) {
      const values = Float64Array.from(c.values, (v) => (missing.has(v) ? Number.NaN : Number(v)));
      const sep = pairwiseSeparation(values, table.y, table.classes.length);
      if (sep === null || sep < t.covariateAuc) continue;
      out.push(
        warning(AUDIT_CODE.confounded, `covariate "${c.name}" goes with the label: ROC AUC ${sep.toFixed(3)} ≥ ${t.covariateAuc}`, {
          ...at,
          hint: `a model can score by what goes with the ${c.name}; compare the classes at similar ${c.name}`,
        }),
      );
    }
  }
  return out;
}
