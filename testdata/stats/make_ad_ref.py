#!/usr/bin/python3
"""Reference values for the Anderson-Darling tests (stats/adtest_test.go).

Run: /usr/bin/python3 make_ad_ref.py > ad_ref.json   (after make_fit_ref.py)

Data: the data sets of fit_ref.json (those with n >= 3).
  anderson(x, 'norm')          -> A² for the normal model (mean, SD ddof=1)
  anderson(log x, 'norm')      -> A² for the lognormal model
  anderson(log x, 'gumbel_l')  -> A² for the Weibull model: if X is Weibull(β, α), ln X is
                                  the smallest-extreme-value law with loc ln α and scale 1/β,
                                  and the ML fits correspond, so the statistic is the same.
Also recorded: scipy's tabulated upper-tail critical points for A*² (Stephens 1974 case 3,
normal; Stephens 1977 extreme value) that anderson() divides by its small-sample factor.
"""
import json
import sys

import numpy as np
import scipy
from scipy import stats
from scipy.stats import _morestats

ref = json.load(open("fit_ref.json"))
out = {"scipy": scipy.__version__, "numpy": np.__version__,
       "Avals_norm": list(_morestats._Avals_norm),
       "Avals_gumbel": list(_morestats._Avals_gumbel),
       "levels_percent": [15, 10, 5, 2.5, 1],
       "sets": []}
for s in ref["sets"]:
    x = np.asarray(s["x"])
    if len(x) < 3 or len(np.unique(x)) < 2:
        continue
    rn = stats.anderson(x, "norm")
    rl = stats.anderson(np.log(x), "norm")
    rg = stats.anderson(np.log(x), "gumbel_l")
    out["sets"].append({
        "name": s["name"], "x": s["x"],
        "a2_norm": float(rn.statistic), "crit_norm": [float(c) for c in rn.critical_values],
        "a2_lognorm": float(rl.statistic),
        "a2_weibull": float(rg.statistic), "crit_weibull": [float(c) for c in rg.critical_values],
        "gumbel_l_fit": [float(v) for v in rg.fit_result.params],
    })
json.dump(out, sys.stdout, indent=1)
print()
