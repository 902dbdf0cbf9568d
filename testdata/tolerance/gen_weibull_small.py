#!/usr/bin/python3
"""Independent Monte Carlo reference for the exact (pivotal) Weibull tolerance factor at
small n, A- and B-basis levels (the entries of lotproof's embedded table stats/weibulltable.go).

Same method as gen_weibull.py (Thoman, Bain & Antle 1970; Lawless 2003 section 5.2.2):
standard Weibull (Exp(1)) samples of size n, maximum-likelihood fit by scipy.optimize.brentq
on the profile equation, gamma quantile C of (ln alpha^ - ln(-ln p)) * beta^,
V = sqrt(n) (C + ln(-ln p)). Both levels from the same samples. Random numbers: numpy PCG64
(independent of lotproof's math/rand/v2 streams and of gen_weibull.py's seed).
Standard error of V from the distribution-free 95% order-statistic interval / (2*1.96).
Run: /usr/bin/python3 gen_weibull_small.py > weibull_factor_small.json
"""
import json, sys, math
import numpy as np, scipy
from scipy import optimize, stats

def mle(x):
    lx = np.log(x)
    u = lx - lx.max()
    ubar = u.mean()
    def g(b):
        w = np.exp(b * u)
        return np.sum(w * u) / np.sum(w) - 1 / b - ubar
    lo, hi = 0.01, 1.0
    while g(hi) < 0:
        hi *= 2
    while g(lo) > 0:
        lo /= 2
    b = optimize.brentq(g, lo, hi, xtol=1e-14, rtol=1e-14)
    alpha = math.exp(lx.max()) * np.mean(np.exp(b * u)) ** (1 / b)
    return b, alpha

rng = np.random.Generator(np.random.PCG64(31415926))
for _ in range(5):
    x = rng.exponential(size=4)
    b, a = mle(x)
    c, loc, sc = stats.weibull_min.fit(x, floc=0)
    assert abs(c - b) < 1e-3 * b and abs(sc - a) < 1e-3 * a, (b, a, c, sc)

out = {"generator": "gen_weibull_small.py", "python": sys.version.split()[0], "scipy": scipy.__version__,
       "numpy": np.__version__, "rows": []}
M = 100000
g = 0.95
for n in [3, 4, 5, 6, 8, 12]:
    la = np.empty(M)
    be = np.empty(M)
    for s in range(M):
        b, a = mle(rng.exponential(size=n))
        la[s], be[s] = math.log(a), b
    for p in [0.90, 0.99]:
        wp = math.log(-math.log(p))
        st = np.sort((la - wp) * be)
        idx = lambda r: min(max(int(math.ceil(r)) - 1, 0), M - 1)
        C = st[idx(g * M)]
        h = 1.959963984540054 * math.sqrt(M * g * (1 - g))
        se = (st[idx(g * M + h)] - st[idx(g * M - h)]) / (2 * 1.959963984540054)
        row = {"n": n, "p": p, "gamma": g, "sims": M, "V": math.sqrt(n) * (C + wp), "seV": math.sqrt(n) * se}
        out["rows"].append(row)
        print(row, file=sys.stderr, flush=True)
json.dump(out, sys.stdout, indent=1)
