/**
 * McNemar's exact test (McNemar 1947; the exact binomial form, e.g. Fagerland, Lydersen & Laake
 * 2013, BMC Medical Research Methodology 13:91) of two classifiers on the same rows: of the
 * discordant rows, b where only A was right and c where only B was, under the null each is
 * Binomial(b + c, 1/2); p = min(1, 2·P(X ≤ min(b, c))). Pure.
 */
import { binomialCdf } from './special.js';

export function mcnemarExact(b: number, c: number): number {
  const n = b + c;
  if (n === 0) return 1;
  return Math.min(1, 2 * binomialCdf(Math.min(b, c), n, 0.5));
}
