#!/usr/bin/python3
"""Reference values for Levene/Brown-Forsythe and the F survival function
(stats/anova_test.go).

Run: /usr/bin/python3 make_anova_ref.py > anova_ref.json

 - scipy.stats.levene(*groups, center='median') on seeded random groups (inputs drawn here)
   and on the NIST StRD ANOVA data sets in nist_anova/.
 - scipy.stats.f_oneway on the same random groups.
 - the F survival function P(F(d1, d2) > x) over a grid covering the degrees of freedom and
   the range of F used by the ANOVA and Levene tests, including far tails (p down to ~1e-300):
   scipy.stats.f.sf and mpmath (Debian python3-mpmath) betainc at 30 digits. Both scipy
   1.10 and gonum carry relative errors up to ~1e-10 for d2 >= 18000; mpmath is the reference.
"""
import json
import os
import sys

import mpmath as mp
import numpy as np
import scipy
from scipy import stats

rng = np.random.RandomState(1974)


def nist_groups(path):
    lines = open(path).read().splitlines()
    start = next(i for i, l in enumerate(lines) if l.startswith("Data:") and "Factor" not in l)
    groups = {}
    for l in lines[start + 1:]:
        p = l.split()
        if len(p) == 2:
            groups.setdefault(int(p[0]), []).append(float(p[1]))
    return [groups[k] for k in sorted(groups)]


sets = {
    "k3_equal": [list(rng.normal(0, 1, n)) for n in (8, 12, 10)],
    "k4_scale": [list(rng.normal(0, s, 9)) for s in (1, 1.5, 3, 1)],
    "k5_unbalanced": [list(rng.normal(50, 2, n)) for n in (3, 7, 4, 15, 6)],
    "k2_ties": [[float(v) for v in np.round(rng.normal(10, 2, 11))],
                [float(v) for v in np.round(rng.normal(10, 4, 13))]],
    "k6_lognormal": [list(rng.lognormal(3, 0.4, 6)) for _ in range(6)],
    "k2_small": [[1.0, 2.0, 4.0], [3.0, 3.5, 9.0, 10.0]],
}
# Real-measurement NIST sets only: in SmLs01-09 every group has the same pattern of
# deviations, the exact Levene F is 0 and scipy returns rounding noise.
for name in ("AtmWtAg", "SiRstv"):
    f = os.path.join(os.path.dirname(os.path.abspath(__file__)), "nist_anova", name + ".dat")
    sets["nist_" + name] = nist_groups(f)

mp.mp.dps = 30


def f_sf_mp(a, b, y):
    """I_y(a, b) by mpmath betainc; where its hypergeometric evaluation fails, by the
    positive-term series summed directly, on the side that converges fast (DLMF 8.17.8
    form): I_y(a,b) = y^a (1-y)^b / (a B(a,b)) sum_n [(a+b)_n / (a+1)_n] y^n, and
    I_y(a,b) = 1 - I_{1-y}(b, a)."""
    try:
        return mp.betainc(a, b, 0, y, regularized=True)
    except Exception:
        pass
    if y < (a + 1) / (a + b + 2):
        return euler(a, b, y)
    return 1 - euler(b, a, 1 - y)


def euler(a, b, y):
    pre = mp.exp(a * mp.log(y) + b * mp.log1p(-y) - mp.log(a) - mp.log(mp.beta(a, b)))
    term, total, n = mp.mpf(1), mp.mpf(1), 0
    while term > total * mp.mpf(10) ** (-35):
        term *= (a + b + n) / (a + 1 + n) * y
        total += term
        n += 1
        if n > 5 * 10**6:
            raise RuntimeError("series did not converge")
    return pre * total


out = {"mpmath": mp.__version__, "scipy": scipy.__version__, "numpy": np.__version__, "levene": [], "fsf": []}
for name, g in sets.items():
    lv = stats.levene(*g, center="median")
    fo = stats.f_oneway(*g)
    out["levene"].append({"name": name, "groups": [[float(v) for v in x] for x in g] if not name.startswith("nist_") else None,
                          "nist": name[5:] if name.startswith("nist_") else None,
                          "F": float(lv.statistic), "p": float(lv.pvalue),
                          "anova_F": float(fo.statistic), "anova_p": float(fo.pvalue)})
# Exact one-way ANOVA (rational arithmetic) of the NIST data as rounded to binary64: what a
# perfect double-precision program would report. For SmLs07-09 (1e12 + 0.x) the rounding of
# the inputs alone moves the statistics in the 5th digit.
from fractions import Fraction
out["nist_binary64_exact"] = {}
for f in sorted(os.listdir(os.path.join(os.path.dirname(os.path.abspath(__file__)), "nist_anova"))):
    if not f.endswith(".dat"):
        continue
    g = [[Fraction(float(v)) for v in grp] for grp in
         nist_groups(os.path.join(os.path.dirname(os.path.abspath(__file__)), "nist_anova", f))]
    n = sum(len(x) for x in g)
    gm = sum(sum(x, Fraction(0)) for x in g) / n
    means = [sum(x, Fraction(0)) / len(x) for x in g]
    ssb = sum(len(x) * (m - gm) ** 2 for x, m in zip(g, means))
    ssw = sum(sum((v - m) ** 2 for v in x) for x, m in zip(g, means))
    k = len(g)
    out["nist_binary64_exact"][f[:-4]] = {"SSB": float(ssb), "SSW": float(ssw),
                                          "F": float((ssb / (k - 1)) / (ssw / (n - k)))}
for d1 in (1, 2, 3, 4, 8, 9, 20, 99, 499):
    for d2 in (1, 2, 5, 10, 20, 46, 180, 1800, 18000, 100000):
        for x in (1e-6, 0.01, 0.3, 1.0, 1.5, 3.0, 10.0, 30.0, 200.0, 2001.0, 1e5):
            a, b = mp.mpf(d2) / 2, mp.mpf(d1) / 2
            y = mp.mpf(d2) / (d2 + d1 * mp.mpf(x))
            ref = f_sf_mp(a, b, y)
            out["fsf"].append([d1, d2, x, float(ref), float(stats.f.sf(x, d1, d2))])
json.dump(out, sys.stdout, indent=0)
print()
