/**
 * Special functions for the interval and test statistics: log-gamma, the regularized incomplete
 * gamma and beta functions, and the normal, Student t and binomial distributions built on them.
 * Standard numerical methods (Lanczos' log-gamma; series and Lentz's continued fractions for the
 * incomplete functions, as in Press et al., Numerical Recipes, 3rd ed., §6.1–6.4); quantiles by
 * safeguarded Newton steps on the CDF. Pure; accuracy held to scipy.stats in test/stats/.
 */

const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905,
  -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

/** ln Γ(x) for x > 0 (Lanczos, g = 7, n = 9; relative error about 1e-15). */
export function logGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - logGamma(1 - x);
  const z = x - 1;
  let a = LANCZOS[0];
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += LANCZOS[i] / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

const EPS = 1e-16;
const TINY = 1e-300;

/** Regularized lower incomplete gamma P(a, x). */
export function gammaP(a: number, x: number): number {
  if (x <= 0) return 0;
  if (x < a + 1) {
    // Series.
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < 10000; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * EPS) break;
    }
    return sum * Math.exp(-x + a * Math.log(x) - logGamma(a));
  }
  return 1 - gammaQContinued(a, x);
}

/** Regularized upper incomplete gamma Q(a, x) = 1 − P(a, x), accurate in the far tail (tiny p-values). */
export function gammaQ(a: number, x: number): number {
  if (x <= 0) return 1;
  return x < a + 1 ? 1 - gammaP(a, x) : gammaQContinued(a, x);
}

/** Q(a, x) = 1 − P(a, x) by Lentz's continued fraction (x ≥ a + 1). */
function gammaQContinued(a: number, x: number): number {
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 10000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) break;
  }
  return Math.exp(-x + a * Math.log(x) - logGamma(a)) * h;
}

/** Regularized incomplete beta I_x(a, b). */
export function betaI(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const front = Math.exp(logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log1p(-x));
  if (x < (a + 1) / (a + b + 2)) return (front * betaContinued(x, a, b)) / a;
  return 1 - (front * betaContinued(1 - x, b, a)) / b;
}

function betaContinued(x: number, a: number, b: number): number {
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m < 10000; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) break;
  }
  return h;
}

/** Standard normal CDF Φ(x), via P(1/2, x²/2). */
export function normalCdf(x: number): number {
  const half = 0.5 * gammaP(0.5, (x * x) / 2);
  return x >= 0 ? 0.5 + half : 0.5 - half;
}

/** Upper tail 1 − Φ(x) without cancellation for large x. */
export function normalUpper(x: number): number {
  if (x < 0) return 1 - normalUpper(-x);
  const z = (x * x) / 2;
  return z < 1.5 ? 0.5 - 0.5 * gammaP(0.5, z) : 0.5 * gammaQContinued(0.5, z);
}

const normalDensity = (x: number) => Math.exp(-0.5 * x * x) / Math.sqrt(2 * Math.PI);

/** Φ⁻¹(p) for 0 < p < 1. */
export function normalQuantile(p: number): number {
  if (p <= 0) return -Infinity;
  if (p >= 1) return Infinity;
  if (p > 0.5) return -normalQuantile(1 - p);
  // Start from a logistic approximation, then Newton steps on the lower tail.
  let x = -Math.sqrt(-2 * Math.log(p));
  x = x + (2.515517 + 0.802853 * -x + 0.010328 * x * x) / (1 + 1.432788 * -x + 0.189269 * x * x + 0.001308 * -x * x * x);
  for (let i = 0; i < 50; i++) {
    const f = normalUpper(-x) - p;
    const step = f / normalDensity(x);
    x -= step;
    if (Math.abs(step) < 1e-15 * Math.max(1, Math.abs(x))) break;
  }
  return x;
}

/** Student t CDF with df degrees of freedom. */
export function tCdf(t: number, df: number): number {
  const tail = 0.5 * betaI(df / (df + t * t), df / 2, 0.5);
  return t >= 0 ? 1 - tail : tail;
}

const tDensity = (t: number, df: number) =>
  Math.exp(logGamma((df + 1) / 2) - logGamma(df / 2) - 0.5 * Math.log(df * Math.PI) - ((df + 1) / 2) * Math.log1p((t * t) / df));

/** Upper tail P(T > t) of Student t for t ≥ 0, computed directly (no 1 − cancellation). */
function tUpper(t: number, df: number): number {
  return 0.5 * betaI(df / (df + t * t), df / 2, 0.5);
}

/** Student t quantile: the t with tCdf(t, df) = p. */
export function tQuantile(p: number, df: number): number {
  if (p <= 0) return -Infinity;
  if (p >= 1) return Infinity;
  if (p === 0.5) return 0;
  // Solve on the smaller tail q = P(T > x), x > 0, so neither p nor 1 − p loses digits.
  const q = p < 0.5 ? p : 1 - p;
  const sign = p < 0.5 ? -1 : 1;
  // Bracket, then Newton steps kept inside the bracket (bisection when a step leaves it).
  let lo = 0;
  let hi = 1;
  while (tUpper(hi, df) > q) hi *= 2;
  let x = Math.max(lo, Math.min(hi, -normalQuantile(q)));
  for (let i = 0; i < 300; i++) {
    const f = tUpper(x, df) - q;
    if (f < 0) hi = x;
    else lo = x;
    let next = x + f / tDensity(x, df);
    if (!(next > lo && next < hi)) next = (lo + hi) / 2;
    if (Math.abs(next - x) <= 4e-16 * Math.abs(x)) return sign * next;
    x = next;
  }
  return sign * x;
}

/** P(X ≤ k) for X ~ Binomial(n, p), by summing the probability masses (exact enough for the n of paired tests). */
export function binomialCdf(k: number, n: number, p: number): number {
  if (k < 0) return 0;
  if (k >= n) return 1;
  // I_{1−p}(n − k, k + 1) = P(X ≤ k).
  return betaI(1 - p, n - k, k + 1);
}
