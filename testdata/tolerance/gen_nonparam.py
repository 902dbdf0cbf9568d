#!/usr/bin/python3
"""Reference values for lotproof's nonparametric bounds.

* Order-statistic rank r(n): largest r with scipy.stats.binom.sf(r-1, n, 1-p) >= gamma
  (P(Binomial(n, 1-p) >= r) >= gamma; Wilks 1941, CMH-17-1G 8.3.4.5.1), and binomial tails.
* Hanson-Koopmans factor k(n, r): solved in mpmath (25 digits) from the miss probability for
  the uniform population (the least favourable case of Hanson & Koopmans 1964),
      n!/((r-1)!(n-r)!) int_q^1 v^(r-1) (1-v)^(n-r) (1 - (q/v)^(1/k))^(r-1) dv = 1 - gamma,
  q = 1 - p, and for r = 2 additionally from the closed form of the inner integral
  (polynomial expansion of (1-v)^(n-2)), a second route.
Run: /usr/bin/python3 gen_nonparam.py > nonparam.json
"""
import json, sys
import numpy as np, scipy, mpmath
from scipy import stats

mpmath.mp.dps = 25
out = {"generator": "gen_nonparam.py", "python": sys.version.split()[0], "scipy": scipy.__version__,
       "numpy": np.__version__, "mpmath": mpmath.__version__, "ranks": [], "binom": [], "hk": []}

for p, g in [(0.90, 0.95), (0.99, 0.95), (0.95, 0.90), (0.75, 0.99)]:
    for n in list(range(2, 400)) + [500, 1000, 5000]:
        r = 0
        while r < n and stats.binom.sf(r, n, 1 - p) >= g:  # sf(r) = P(X >= r+1)
            r += 1
        out["ranks"].append({"n": n, "p": p, "gamma": g, "r": r,
                             "achieved": float(stats.binom.sf(r - 1, n, 1 - p)) if r > 0 else None})

for n, r, q in [(29, 1, 0.1), (100, 5, 0.1), (100, 10, 0.1), (299, 1, 0.01), (1000, 3, 0.01), (50, 40, 0.7), (7, 7, 0.5)]:
    out["binom"].append({"n": n, "r": r, "q": q, "sf": float(stats.binom.sf(r - 1, n, q))})

def miss(n, r, q, u):
    c = mpmath.factorial(n) / (mpmath.factorial(r - 1) * mpmath.factorial(n - r))
    f = lambda v: v**(r - 1) * (1 - v)**(n - r) * (1 - (q / v)**u)**(r - 1)
    # Break the range around the Beta(r, n-r+1) peak (mean +- 12 sd) so large n is resolved.
    m = mpmath.mpf(r) / (n + 1)
    sd = mpmath.sqrt(mpmath.mpf(r) * (n - r + 1) / ((n + 1) ** 2 * (n + 2)))
    pts = [q] + [m + j * sd for j in range(-12, 13) if q < m + j * sd < 1] + [1]
    return c * mpmath.quad(f, pts)

def miss_r2(n, q, u):
    # r = 2: n(n-1) int_q^1 v (1-v)^(n-2) (1 - (q/v)^u) dv, expand (1-v)^(n-2) binomially.
    s = mpmath.mpf(0)
    for j in range(n - 1):
        c = mpmath.binomial(n - 2, j) * (-1)**j
        a = j + 2            # int v^(j+1) dv = (1 - q^a)/a
        b = j + 2 - u        # int q^u v^(j+1-u) dv = q^u (1 - q^b)/b
        s += c * ((1 - q**a) / a - q**u * (1 - q**b) / b)
    return n * (n - 1) * s

def solve(fn, q, g):
    lo, hi = mpmath.mpf(0), mpmath.mpf(1)
    if fn(hi) <= 1 - g:
        return mpmath.mpf(1)
    for _ in range(80):
        mid = (lo + hi) / 2
        if fn(mid) > 1 - g:
            hi = mid
        else:
            lo = mid
    return 2 / (lo + hi)

cases = []
for n in range(2, 29):
    cases.append((n, n, 0.90, 0.95))
for n in list(range(2, 21)) + [30, 50, 100, 200, 298]:
    cases.append((n, n, 0.99, 0.95))
cases += [(1000, 1000, 0.999, 0.95), (2000, 2000, 0.9999, 0.95), (10, 2, 0.90, 0.95), (20, 2, 0.99, 0.95), (15, 8, 0.99, 0.95), (12, 6, 0.95, 0.90), (5, 3, 0.75, 0.99)]
for n, r, p, g in cases:
    q = mpmath.mpf(1) - mpmath.mpf(p)
    k = solve(lambda u: miss(n, r, q, u), q, g)
    row = {"n": n, "r": r, "p": p, "gamma": g, "k": float(k)}
    if r == 2:
        row["k_closed_form"] = float(solve(lambda u: miss_r2(n, q, u), q, g))
    out["hk"].append(row)
    print(row, file=sys.stderr, flush=True)

json.dump(out, sys.stdout, indent=1)
