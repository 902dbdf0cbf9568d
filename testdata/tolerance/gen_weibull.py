#!/usr/bin/python3
"""Independent Monte Carlo reference for the exact (pivotal) Weibull tolerance factor.

Thoman, Bain & Antle (1970); Lawless (2003) section 5.2.2: simulate standard Weibull
(Exp(1)) samples of size n, fit the two-parameter Weibull by maximum likelihood (profile
equation for the shape solved with scipy.optimize.brentq, checked against
scipy.stats.weibull_min.fit on the first samples), and take the gamma quantile C of
(ln alpha^ - ln(-ln p)) * beta^.  V = sqrt(n) (C + ln(-ln p)), the CMH-17-1G form.
Random numbers: numpy PCG64 (independent of lotproof's math/rand/v2 streams).
Standard error of V from the distribution-free 95% order-statistic interval / (2*1.96).
Run: /usr/bin/python3 gen_weibull.py > weibull_factor.json
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

rng = np.random.Generator(np.random.PCG64(20261202))
# Cross-check the MLE against scipy's generic fit on a few samples.
for _ in range(5):
    x = rng.exponential(size=12)
    b, a = mle(x)
    c, loc, sc = stats.weibull_min.fit(x, floc=0)
    assert abs(c - b) < 1e-3 * b and abs(sc - a) < 1e-3 * a, (b, a, c, sc)

out = {"generator": "gen_weibull.py", "python": sys.version.split()[0], "scipy": scipy.__version__,
       "numpy": np.__version__, "rows": []}
M = 40000
for n, p, g in [(10, 0.90, 0.95), (10, 0.99, 0.95), (30, 0.90, 0.95), (30, 0.99, 0.95), (30, 0.95, 0.90),
                (100, 0.90, 0.95)]:
    wp = math.log(-math.log(p))
    st = np.empty(M)
    for s in range(M):
        b, a = mle(rng.exponential(size=n))
        st[s] = (math.log(a) - wp) * b
    st.sort()
    idx = lambda r: min(max(int(math.ceil(r)) - 1, 0), M - 1)
    C = st[idx(g * M)]
    h = 1.959963984540054 * math.sqrt(M * g * (1 - g))
    se = (st[idx(g * M + h)] - st[idx(g * M - h)]) / (2 * 1.959963984540054)
    row = {"n": n, "p": p, "gamma": g, "sims": M, "V": math.sqrt(n) * (C + wp), "seV": math.sqrt(n) * se}
    out["rows"].append(row)
    print(row, file=sys.stderr, flush=True)
json.dump(out, sys.stdout, indent=1)
