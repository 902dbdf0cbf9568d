#!/usr/bin/python3
"""Dense grid of one-sided normal tolerance factors from scipy.stats.nct.ppf (Boost.Math):
every n from 2 to 200, then every 997th n up to 100,000 and n = 100,000, at the A-basis
(0.99/0.95) and B-basis (0.90/0.95) levels. k = nct.ppf(0.95, n-1, z_p sqrt n)/sqrt n.
Run: /usr/bin/python3 gen_normal_k_dense.py > normal_k_dense.json
"""
import json, sys, math
import numpy as np, scipy
from scipy import stats
from scipy.special import ndtri

ns = list(range(2, 201)) + list(range(1201, 100000, 997)) + [100000]
out = {"generator": "gen_normal_k_dense.py", "python": sys.version.split()[0], "scipy": scipy.__version__,
       "numpy": np.__version__, "n": ns, "k": {}}
for p in (0.99, 0.90):
    ks = []
    for n in ns:
        with np.errstate(all='ignore'):
            v = stats.nct.ppf(0.95, n - 1, ndtri(p) * math.sqrt(n)) / math.sqrt(n)
        ks.append(float(v) if np.isfinite(v) else None)
    out["k"][str(p)] = ks
json.dump(out, sys.stdout)
