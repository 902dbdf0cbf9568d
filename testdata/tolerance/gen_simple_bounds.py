#!/usr/bin/python3
"""Reference normal and lognormal lower tolerance bounds on public data.

Data: NIST StRD SiRstv (25 resistivity values) and AtmWtAg (48 silver atomic weights),
from ../stats/nist_anova/. Bound = mean - k s (normal) and exp(mean(ln x) - k sd(ln x))
(lognormal, CMH-17-1G 8.3.4.3), k from scipy.stats.nct.ppf.
Run: /usr/bin/python3 gen_simple_bounds.py > simple_bounds.json
"""
import json, sys, math
import numpy as np, scipy
from scipy import stats

def read_nist(path):
    vals, data = [], False
    for line in open(path):
        if line.strip().startswith("Data:") and line.split()[1] == "Instrument":
            data = True
            continue
        if data and line.strip():
            vals.append(float(line.split()[1]))
    return vals

def kfac(n, p, g):
    return float(stats.nct.ppf(g, n - 1, stats.norm.ppf(p) * math.sqrt(n)) / math.sqrt(n))

out = {"generator": "gen_simple_bounds.py", "python": sys.version.split()[0], "scipy": scipy.__version__,
       "numpy": np.__version__, "cases": []}
for name in ["SiRstv", "AtmWtAg"]:
    x = np.array(read_nist("../stats/nist_anova/%s.dat" % name))
    for p, g in [(0.90, 0.95), (0.99, 0.95), (0.75, 0.80)]:
        k = kfac(len(x), p, g)
        y = np.log(x)
        out["cases"].append({"name": name, "p": p, "gamma": g, "x": x.tolist(), "k": k,
                             "normal": float(x.mean() - k * x.std(ddof=1)),
                             "lognormal": float(math.exp(y.mean() - k * y.std(ddof=1)))})
json.dump(out, sys.stdout, indent=1)
