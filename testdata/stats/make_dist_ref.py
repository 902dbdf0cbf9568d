#!/usr/bin/python3
"""Reference values for the distribution functions that stats leans on, and for
the maximum normed residual test (stats/outlier_test.go, stats/adtest_test.go).

Run: /usr/bin/python3 make_dist_ref.py > dist_ref.json

 - the upper alpha/(2n) quantile of Student's t with n-2 df, n = 3..1e7, alpha = 0.001..0.2
   (MNR critical values), two ways: scipy.stats.t.isf, and mpmath (Debian python3-mpmath) at
   40 digits, solving 1/2 I_{df/(df+t^2)}(df/2, 1/2) = q with findroot from scipy's value.
   scipy 1.10's t.isf turns out to be good to only ~2e-9 relative here; mpmath is the reference.
 - the MNR critical value C = (n-1)/sqrt(n) sqrt(t^2/(n-2+t^2)) from the mpmath t
 - scipy.stats.norm.logcdf(z), z = -60..40 (Anderson-Darling normal/lognormal)
 - an independent numpy implementation of the iterative MNR screen on seeded data sets
   with planted outliers (inputs drawn here).
"""
import json
import sys

import mpmath as mp
import numpy as np
import scipy
from scipy import stats

ns = list(range(3, 31)) + [35, 40, 50, 60, 75, 100, 150, 200, 300, 500, 1000, 2000, 5000, 10000,
                               30000, 100000, 1000000, 10000000]
alphas = [0.001, 0.01, 0.02, 0.05, 0.10, 0.20]
mp.mp.dps = 40


def t_isf_mp(q, df):
    q = mp.mpf(q)
    df = mp.mpf(df)
    f = lambda t: mp.betainc(df / 2, mp.mpf(1) / 2, 0, df / (df + t * t), regularized=True) / 2 - q
    return mp.findroot(f, mp.mpf(stats.t.isf(float(q), float(df))))


tq = []
for n in ns:
    for a in alphas:
        ts = stats.t.isf(a / (2 * n), n - 2)
        t = t_isf_mp(mp.mpf(a) / (2 * n), n - 2)
        c = (n - 1) / mp.sqrt(n) * mp.sqrt(t * t / (n - 2 + t * t))
        tq.append([n, a, float(t), float(c), float(ts)])

zs = [float(z) for z in np.concatenate([np.linspace(-60, 40, 201), [-37.5, -35.0001, -34.9999, -8.3, 1e-10, 8.5, 9.0]])]
logcdf = [[z, float(stats.norm.logcdf(z))] for z in zs]


def screen(x, alpha, iterative):
    x = np.asarray(x, float)
    keep = list(range(len(x)))
    flagged = []
    while len(keep) >= 3:
        y = x[keep]
        m, s = y.mean(), y.std(ddof=1)
        if s == 0:
            break
        d = np.abs(y - m)
        j = int(np.argmax(d))
        n = len(y)
        t = stats.t.isf(alpha / (2 * n), n - 2)
        c = (n - 1) / np.sqrt(n) * np.sqrt(t * t / (n - 2 + t * t))
        if d[j] / s <= c:
            break
        flagged.append([keep[j], float(d[j] / s), float(c)])
        keep.pop(j)
        if not iterative:
            break
    return flagged


rng = np.random.RandomState(1969)
sets = {}
a = list(rng.normal(100, 2, 20)); a[5] = 130.0; a[13] = 80.0; sets["two_planted"] = a
b = list(rng.normal(50, 1, 12)); b[0] = 58.0; b[1] = 57.5; b[2] = 53.5; sets["masked_pair"] = b
sets["clean"] = list(rng.normal(10, 1, 30))
c = list(rng.normal(0, 1, 8)); c[7] = 6.0; sets["n8_one"] = c
screens = []
for name, x in sets.items():
    for alpha in (0.05, 0.01):
        for it in (False, True):
            screens.append({"name": name, "x": [float(v) for v in x], "alpha": alpha, "iterative": it,
                            "flagged": screen(x, alpha, it)})

json.dump({"scipy": scipy.__version__, "mpmath": mp.__version__, "numpy": np.__version__, "t_isf": tq,
           "norm_logcdf": logcdf, "screens": screens}, sys.stdout, indent=0)
print()
