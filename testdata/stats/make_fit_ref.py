#!/usr/bin/python3
"""Reference values for lotproof stats fits (stats/fit_test.go).

Run with Debian's interpreter: /usr/bin/python3 make_fit_ref.py > fit_ref.json
Uses Debian python3-scipy / python3-numpy. Data sets are drawn here with a
fixed numpy seed (they are test inputs, not reference values); the reference
values are what scipy computes from them.

Per data set it records:
  norm.fit            (MLE: mu, sigma with divisor n)
  lognorm.fit(floc=0) (s = sigma of ln x with divisor n, scale = exp(mu))
  weibull_min.fit(floc=0) as shipped (Nelder-Mead, loose: ~1e-4)
  weibull_min.fit(floc=0) with a tight Nelder-Mead optimizer
  the 2-parameter Weibull MLE by scipy.optimize.brentq on the profile
  likelihood equation, at full precision, and weibull_min.nnlf at both.
"""
import json
import sys

import numpy as np
import scipy
from scipy import optimize, stats

rng = np.random.RandomState(20261202)

sets = {}
sets["weib_n10"] = list(stats.weibull_min.rvs(8.0, scale=100.0, size=10, random_state=rng))
sets["weib_n30"] = list(stats.weibull_min.rvs(20.0, scale=350.0, size=30, random_state=rng))
sets["weib_n200_shape1.5"] = list(stats.weibull_min.rvs(1.5, scale=2.0, size=200, random_state=rng))
sets["norm_n18"] = list(stats.norm.rvs(loc=150.0, scale=6.0, size=18, random_state=rng))
sets["lognorm_n25"] = list(stats.lognorm.rvs(0.3, scale=40.0, size=25, random_state=rng))
sets["near_1e6"] = list(1e6 + stats.norm.rvs(scale=30.0, size=15, random_state=rng))
sets["near_1e-3"] = list(1e-3 * stats.weibull_min.rvs(12.0, scale=1.0, size=15, random_state=rng))
sets["heavy_ties"] = [float(v) for v in np.round(stats.norm.rvs(loc=60, scale=1.2, size=40, random_state=rng))]
sets["two_values"] = [1.0, 2.0]
sets["two_distinct_many_ties"] = [5.0] * 9 + [7.0]
sets["n3"] = [312.5, 298.25, 305.0]
sets["wide_range"] = [1e-3, 0.5, 2.0, 40.0, 1e3]
sets["shape_large"] = list(1000.0 + stats.norm.rvs(scale=0.5, size=20, random_state=rng))


def weibull_profile_root(x):
    lx = np.log(x)
    u = lx - lx.max()
    ubar = u.mean()

    def g(b):
        w = np.exp(b * u)
        return (w * u).sum() / w.sum() - ubar - 1.0 / b

    lo, hi = 1e-3, 1.0
    while g(hi) < 0:
        hi *= 2
    while g(lo) > 0:
        lo /= 2
    b = optimize.brentq(g, lo, hi, xtol=1e-300, rtol=4 * np.finfo(float).eps, maxiter=2000)
    a = np.exp(lx.max() + np.log(np.exp(b * u).mean()) / b)
    return b, a


def tight(func, x0, args=(), disp=0):
    return optimize.fmin(func, x0, args=args, xtol=1e-14, ftol=1e-14, maxiter=100000,
                         maxfun=200000, disp=0)


out = {"scipy": scipy.__version__, "numpy": np.__version__, "python": sys.version.split()[0],
       "sets": []}
for name, x in sets.items():
    x = np.asarray(x, dtype=float)
    mu, sig = stats.norm.fit(x)
    s, _, sc = stats.lognorm.fit(x, floc=0)
    c0, _, a0 = stats.weibull_min.fit(x, floc=0)
    c1, _, a1 = stats.weibull_min.fit(x, floc=0, optimizer=tight)
    b, a = weibull_profile_root(x)
    out["sets"].append({
        "name": name, "x": [float(v) for v in x],
        "norm_mu": mu, "norm_sigma_mle": sig,
        "lognorm_s_mle": s, "lognorm_scale": sc,
        "weibull_fit_default": [c0, a0],
        "weibull_fit_tight": [c1, a1],
        "weibull_brentq": [b, a],
        "nnlf_brentq": stats.weibull_min.nnlf((b, 0, a), x),
        "nnlf_tight": stats.weibull_min.nnlf((c1, 0, a1), x),
    })
json.dump(out, sys.stdout, indent=1)
print()
