# Reference values for stats/nonconforming.go, made with Debian's
# /usr/bin/python3 and python3-scipy (versions recorded in the output).
#   /usr/bin/python3 make_nonconforming_ref.py > nonconforming_ref.json
import json, sys
import numpy, scipy
from scipy import special, stats, optimize

out = {"scipy": scipy.__version__, "numpy": numpy.__version__,
       "python": sys.version.split()[0], "mvue": [], "bound": [], "tq": []}

# Lieberman-Resnikoff MVUE, written out from the formula with scipy's betainc.
for n in [3, 4, 5, 8, 10, 20, 50, 200]:
    for q in [-1.5, -0.3, 0.0, 0.4, 1.0, 1.8, 2.5, 3.5]:
        b = 0.5 - q * n ** 0.5 / (2 * (n - 1))
        b = min(1.0, max(0.0, b))
        a = (n - 2) / 2
        v = float(special.betainc(a, a, b)) if 0 < b < 1 else b
        out["mvue"].append({"n": n, "q": q, "p": v})

# Confidence bounds on the fraction beyond the limit from scipy.stats.nct.
for n in [2, 3, 5, 10, 30, 100]:
    for q in [-1.0, 0.0, 0.8, 1.5, 2.2, 3.0, 4.5]:
        for g in [0.90, 0.95, 0.99]:
            t = q * n ** 0.5
            row = {"n": n, "q": q, "gamma": g}
            for name, target in (("upper", g), ("lower", 1 - g)):
                f = lambda d: stats.nct.cdf(t, n - 1, d) - target
                d = optimize.brentq(f, t - 60, t + 60, xtol=1e-13, rtol=1e-14, maxiter=500)
                row[name] = float(stats.norm.cdf(-d / n ** 0.5))
            out["bound"].append(row)

# Student t quantiles (one-sided confidence bound on the mean).
# scipy 1.10.1's t.ppf (cephes stdtrit) was found off by up to 2e-9
# relative (e.g. df=2, p=0.99, against the closed form
# (2p-1) sqrt(2/(4p(1-p)))), so it is refined by Newton steps on the
# survival function t.sf (regularised incomplete beta), which is accurate.
for n in [2, 3, 5, 10, 30, 1000]:
    for g in [0.5, 0.9, 0.95, 0.99, 0.999]:
        df = n - 1
        t = float(stats.t.ppf(g, df))
        for _ in range(4):
            if g != 0.5:
                t += (stats.t.sf(t, df) - (1 - g)) / stats.t.pdf(t, df)
        out["tq"].append({"df": df, "p": g, "t": float(t)})
# closed forms as a check of the refinement: df=1 tan(pi (p - 1/2)); df=2 above
import math
for r in out["tq"]:
    if r["df"] == 1 and r["p"] != 0.5:
        assert abs(r["t"] - math.tan(math.pi * (r["p"] - 0.5))) < 1e-12 * r["t"], r
    if r["df"] == 2:
        p = r["p"]
        assert abs(r["t"] - (2*p-1)*math.sqrt(2/(4*p*(1-p)))) < 1e-12 * max(1, r["t"]), r

json.dump(out, sys.stdout, indent=1)
