# Expected figures for testdata/acceptance/lots.csv against spec-test.yaml
# (content 0.90, confidence 0.95), computed independently with Debian's
# /usr/bin/python3 and python3-scipy:
#   /usr/bin/python3 make_lots_ref.py > lots_ref.json
import csv, json, sys
import numpy, scipy
from scipy import stats, special, optimize

P, G = 0.90, 0.95
limits = {"tensile": [("min", 930.0)], "hardness": [("min", 269.0), ("max", 331.0)]}
rows = list(csv.DictReader(open("lots.csv")))
out = {"scipy": scipy.__version__, "numpy": numpy.__version__, "lots": []}
for lot in ["A", "B", "C"]:
    for prop, sides in limits.items():
        col = prop + (" [MPa]" if prop == "tensile" else " [HBW]")
        x = numpy.array([float(r[col]) for r in rows if r["lot"] == lot])
        for side, L in sides:
            y = x if side == "min" else -x
            Ls = L if side == "min" else -L
            n = len(y); m = y.mean(); s = y.std(ddof=1)
            k = stats.nct.ppf(G, n - 1, stats.norm.ppf(P) * n ** 0.5) / n ** 0.5
            # t quantile refined by Newton on the survival function (scipy
            # 1.10.1 t.ppf is good to ~2e-9 only; see README.md)
            t = stats.t.ppf(G, n - 1)
            for _ in range(4):
                t += (stats.t.sf(t, n - 1) - (1 - G)) / stats.t.pdf(t, n - 1)
            q = (m - Ls) / s
            b = min(1, max(0, 0.5 - q * n ** 0.5 / (2 * (n - 1))))
            a = (n - 2) / 2
            mvue = float(special.betainc(a, a, b)) if 0 < b < 1 else b
            d = optimize.brentq(lambda d: stats.nct.cdf(q * n ** 0.5, n - 1, d) - G, -50, 50, xtol=1e-13)
            sg = 1 if side == "min" else -1
            out["lots"].append({"lot": lot, "property": prop, "side": side, "n": n,
                "mean": sg * m, "sd": s, "mean_bound": sg * (m - t * s / n ** 0.5), "k": k,
                "tolerance_bound": sg * (m - k * s), "fraction_estimate": mvue,
                "fraction_upper": float(stats.norm.cdf(-d / n ** 0.5))})
json.dump(out, sys.stdout, indent=1)
