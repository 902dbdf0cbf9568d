#!/usr/bin/python3
"""Reference values for lotproof's noncentral t and normal tolerance factor.

Two independent routes:
  * scipy.stats.nct (Boost.Math non_central_t, series method), Debian python3-scipy;
  (noncentral t CDF points: gen_nct_cdf.py)
  * mpmath: direct numerical integration over the chi-square variable,
        P(T <= t) = int_0^inf Phi(t sqrt(x/f) - delta) chi2_f(x) dx,
    at 20 significant digits, and the quantile by mpmath.findroot.
Run with Debian's /usr/bin/python3:  /usr/bin/python3 gen_normal_k.py > normal_k.json
"""
import json, sys, math
import numpy as np, scipy, mpmath
from scipy import stats
from scipy.special import ndtri

mpmath.mp.dps = 20

def mp_cdf_parts(t, f, delta, which="both"):
    """Return (P(T<=t), P(T>t)) by integrating over x ~ chi2_f."""
    t, f, delta = mpmath.mpf(t), mpmath.mpf(f), mpmath.mpf(delta)
    lc = -(f / 2) * mpmath.log(2) - mpmath.loggamma(f / 2)
    def pdf(x):
        return mpmath.exp(lc + (f / 2 - 1) * mpmath.log(x) - x / 2)
    sd = mpmath.sqrt(2 * f)
    pts = [mpmath.mpf(0)]
    for j in range(-14, 15):
        p = f + j * sd
        if p > pts[-1] and p > 0:
            pts.append(p)
    pts.append(mpmath.inf)
    lower = upper = None
    if which in ("both", "lower"):
        lower = mpmath.quad(lambda x: mpmath.ncdf(t * mpmath.sqrt(x / f) - delta) * pdf(x), pts)
    if which in ("both", "upper"):
        upper = mpmath.quad(lambda x: mpmath.ncdf(delta - t * mpmath.sqrt(x / f)) * pdf(x), pts)
    return lower, upper

def mp_quantile(g, f, delta, start):
    g = mpmath.mpf(g)
    if g > 0.5:
        fn = lambda t: mp_cdf_parts(t, f, delta, "upper")[1] - (1 - g)
    else:
        fn = lambda t: mp_cdf_parts(t, f, delta, "lower")[0] - g
    return mpmath.findroot(fn, (mpmath.mpf(start) * (1 - 1e-6), mpmath.mpf(start) * (1 + 1e-6)), solver='secant', tol=1e-28)

out = {"generator": "gen_normal_k.py",
       "python": sys.version.split()[0], "scipy": scipy.__version__, "numpy": np.__version__,
       "mpmath": mpmath.__version__, "k": []}

levels = [(0.99, 0.95), (0.90, 0.95)]
ns_scipy = [2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 15, 18, 20, 25, 30, 35, 40, 50, 60, 75, 100, 150, 200,
            300, 500, 750, 1000, 2000, 3000, 5000, 10000, 20000, 30000, 50000, 70000, 100000]
ns_mp = [2, 3, 5, 10, 20, 30, 100, 300, 1000, 3000, 10000, 30000, 100000]
other = [(0.95, 0.99), (0.75, 0.75), (0.999, 0.999), (0.5, 0.9), (0.3, 0.8)]
ns_other = [2, 7, 30, 1000, 100000]

def sc_k(n, p, g):
    with np.errstate(all='ignore'):
        v = stats.nct.ppf(g, n - 1, ndtri(p) * math.sqrt(n)) / math.sqrt(n)
    return float(v) if np.isfinite(v) else None

for p, g in levels + other:
    ns = ns_scipy if (p, g) in levels else ns_other
    for n in ns:
        row = {"n": n, "p": p, "gamma": g, "scipy": sc_k(n, p, g)}
        if n in ns_mp or (p, g) in other:
            start = row["scipy"] or (ndtri(p) + ndtri(g) / math.sqrt(n))
            t = mp_quantile(g, n - 1, mpmath.mpf(ndtri(p)) * mpmath.sqrt(n), start * math.sqrt(n))
            row["mpmath"] = float(t / mpmath.sqrt(n))
        out["k"].append(row)
        print(row, file=sys.stderr, flush=True)

json.dump(out, sys.stdout, indent=1)
