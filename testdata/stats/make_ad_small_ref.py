#!/usr/bin/python3
"""Actual level of the CMH-17-1G Anderson-Darling OSL rules at small n, by simulation.

For normal samples (normal rule: AD* = (1 + 4/n - 25/n^2) A^2, OSL = 1/(1 + exp(-0.48 +
0.78 ln AD* + 4.58 AD*)), mean and SD estimated) and for Weibull (Exp(1)) samples (Weibull
rule: AD* = (1 + 0.2/sqrt n) A^2, OSL = 1/(1 + exp(-0.10 + 1.24 ln AD* + 4.48 AD*)), shape and
scale by maximum likelihood, scipy.optimize.brentq on the profile equation), the fraction of
samples with OSL <= 0.05 and <= 0.10: the chance that the rule rejects a true model, nominally
0.05 and 0.10. A^2 from scipy.special.ndtr (normal) and numpy (Weibull). numpy PCG64 seeds 7, 11.
Run: /usr/bin/python3 make_ad_small_ref.py > ad_small_ref.json
"""
import json, sys, math
import numpy as np, scipy
from scipy import optimize, special

out = {"generator": "make_ad_small_ref.py", "python": sys.version.split()[0], "scipy": scipy.__version__,
       "numpy": np.__version__, "normal": [], "weibull": []}

def osl(adj, c0, c1, c2):
    return 1 / (1 + np.exp(c0 + c1 * np.log(adj) + c2 * adj))

rng = np.random.Generator(np.random.PCG64(7))
M = 200000
for n in [4, 5, 6, 7, 8, 10, 15]:
    x = np.sort(rng.standard_normal((M, n)), axis=1)
    z = (x - x.mean(1, keepdims=True)) / x.std(1, ddof=1, keepdims=True)
    lF, lS = np.log(special.ndtr(z)), np.log(special.ndtr(-z))
    i = np.arange(1, n + 1)
    a2 = -n - np.sum((2 * i - 1) * (lF + lS[:, ::-1]), axis=1) / n
    f = 1 + 4 / n - 25 / n ** 2
    o = osl(f * a2, -0.48, 0.78, 4.58)
    out["normal"].append({"n": n, "factor": f, "sims": M, "level05": float(np.mean(o <= 0.05)), "level10": float(np.mean(o <= 0.10))})

def mle(x):
    lx = np.log(x); u = lx - lx.max(); ubar = u.mean()
    def g(b):
        w = np.exp(b * u); return np.sum(w * u) / np.sum(w) - 1 / b - ubar
    lo, hi = 0.01, 1.0
    while g(hi) < 0: hi *= 2
    while g(lo) > 0: lo /= 2
    b = optimize.brentq(g, lo, hi, xtol=1e-12)
    return b, math.exp(lx.max()) * np.mean(np.exp(b * u)) ** (1 / b)

rng = np.random.Generator(np.random.PCG64(11))
M = 20000
for n in [3, 4, 5]:
    c5 = c10 = 0
    for s in range(M):
        x = np.sort(rng.exponential(size=n))
        b, a = mle(x)
        w = (x / a) ** b
        lF, lS = np.log(-np.expm1(-w)), -w
        i = np.arange(1, n + 1)
        a2 = -n - np.sum((2 * i - 1) * (lF + lS[::-1])) / n
        adj = (1 + 0.2 / math.sqrt(n)) * a2
        o = 1 / (1 + math.exp(-0.10 + 1.24 * math.log(adj) + 4.48 * adj))
        c5 += o <= 0.05; c10 += o <= 0.10
    out["weibull"].append({"n": n, "sims": M, "level05": c5 / M, "level10": c10 / M})
json.dump(out, sys.stdout, indent=1)
