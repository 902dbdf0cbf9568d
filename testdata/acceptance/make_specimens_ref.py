# Reference values for stats.ToleranceBoundPassProb (specimens planner),
# made with Debian's /usr/bin/python3 and python3-scipy:
#   /usr/bin/python3 make_specimens_ref.py > specimens_ref.json
# P = P(T >= k sqrt(n)), T ~ nct(n-1, sqrt(n) margin), k = nct.ppf(gamma, n-1,
# z_p sqrt(n)) / sqrt(n).
import json, sys
import numpy, scipy
from scipy import stats

out = {"scipy": scipy.__version__, "numpy": numpy.__version__, "rows": []}
for n in [2, 3, 5, 8, 12, 20, 40]:
    for p, g in [(0.90, 0.90), (0.90, 0.95), (0.99, 0.95)]:
        for m in [1.0, 1.5, 2.0, 2.5, 3.5]:
            k = stats.nct.ppf(g, n - 1, stats.norm.ppf(p) * n ** 0.5) / n ** 0.5
            pr = stats.nct.sf(k * n ** 0.5, n - 1, m * n ** 0.5)
            out["rows"].append({"n": n, "p": p, "gamma": g, "margin": m, "k": float(k), "prob": float(pr)})
json.dump(out, sys.stdout, indent=1)
