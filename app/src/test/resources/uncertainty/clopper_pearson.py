#!/usr/bin/python3
"""Reference values for CoverageTest: exact (Clopper-Pearson) 95 % intervals of a binomial
proportion, computed with SciPy (Debian python3-scipy) in two independent ways:
the beta-quantile form and the root of the defining binomial tail equations
P(X >= x; n, p_lo) = alpha/2 and P(X <= x; n, p_hi) = alpha/2.
Run: /usr/bin/python3 clopper_pearson.py"""
from scipy.optimize import brentq
from scipy.stats import beta, binom

ALPHA = 0.05
CASES = [(0, 10), (10, 10), (1, 10), (5, 10), (19, 20), (95, 100), (18, 40)]

for x, n in CASES:
    lo = 0.0 if x == 0 else beta.ppf(ALPHA / 2, x, n - x + 1)
    hi = 1.0 if x == n else beta.ppf(1 - ALPHA / 2, x + 1, n - x)
    lo2 = 0.0 if x == 0 else brentq(lambda p: binom.sf(x - 1, n, p) - ALPHA / 2, 1e-15, 1 - 1e-15, xtol=1e-15)
    hi2 = 1.0 if x == n else brentq(lambda p: binom.cdf(x, n, p) - ALPHA / 2, 1e-15, 1 - 1e-15, xtol=1e-15)
    assert abs(lo - lo2) < 1e-10 and abs(hi - hi2) < 1e-10, (x, n, lo, lo2, hi, hi2)
    print(f"x={x:3d} n={n:3d}  lower={lo:.12f}  upper={hi:.12f}")
