#!/usr/bin/env python3
"""Distribution values from scipy.stats (Debian's python3-scipy) for the interval and test
statistics, and Student t quantiles to 30 digits from mpmath (Debian's python3-mpmath): scipy
1.10's t.ppf is accurate to about 1e-9 only (its own t.cdf of its t.ppf(0.05, 4) is 0.0500000003).
Writes fixtures/stats-scipy.json. Usage: /usr/bin/python3 stats_reference.py"""
import json
import mpmath
import scipy
from scipy import stats

mpmath.mp.dps = 30


def t_ppf_mp(p, df):
    """The t with P(T <= t) = p, solving the upper tail 0.5 * I_{df/(df+t^2)}(df/2, 1/2) = q at 30 digits."""
    q = mpmath.mpf(p) if p < 0.5 else 1 - mpmath.mpf(p)
    tail = lambda t: mpmath.betainc(df / mpmath.mpf(2), mpmath.mpf(1) / 2, 0, df / (df + t * t), regularized=True) / 2 - q
    lo, hi = mpmath.mpf(0), mpmath.mpf(1)
    while tail(hi) > 0:
        hi *= 2
    for _ in range(200):
        mid = (lo + hi) / 2
        if tail(mid) > 0:
            lo = mid
        else:
            hi = mid
    x = (lo + hi) / 2
    return float(-x if p < 0.5 else x)

ps = [1e-10, 1e-4, 0.001, 0.025, 0.05, 0.1, 0.3, 0.5, 0.7, 0.9, 0.95, 0.975, 0.995, 0.9999]
dfs = [1, 2, 3, 4, 9, 24, 49, 99, 1000]
out = {
    "scipy": scipy.__version__,
    "t_ppf": [[p, df, float(stats.t.ppf(p, df))] for p in ps for df in dfs],
    "t_ppf_mpmath": [[p, df, t_ppf_mp(p, df)] for p in ps for df in dfs if p != 0.5],
    "t_cdf": [[x, df, float(stats.t.cdf(x, df))] for x in [-30, -4.5, -2, -0.3, 0, 0.7, 2.2, 9] for df in dfs],
    "norm_ppf": [[p, float(stats.norm.ppf(p))] for p in ps + [1e-300, 1 - 1e-16]],
    "norm_cdf": [[x, float(stats.norm.cdf(x))] for x in [-37, -8, -3.3, -1, -0.01, 0, 0.5, 1.96, 6]],
    "norm_sf": [[x, float(stats.norm.sf(x))] for x in [0.5, 3, 8, 20, 37]],
    "binom_cdf": [[k, n, 0.5, float(stats.binom.cdf(k, n, 0.5))] for n, k in [(1, 0), (10, 2), (25, 7), (40, 20), (200, 80), (1000, 470)]],
}
json.dump(out, open("fixtures/stats-scipy.json", "w"), indent=1)
