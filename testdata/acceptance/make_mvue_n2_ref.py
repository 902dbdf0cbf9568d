#!/usr/bin/python3
"""Reference for the fraction-nonconforming MVUE at n = 2 (stats.TailFractionMVUE).

The Lieberman-Resnikoff estimator I_B(a, a), a = (n-2)/2, B = 1/2 - q sqrt(n)/(2(n-1)), has
a = 0 at n = 2; its limit is taken numerically with scipy.special.betainc at a = 1e-12, and
beside it the Rao-Blackwell value 1/2 [1(xbar - s/sqrt2 < L) + 1(xbar + s/sqrt2 < L)] computed
from two values x1, x2 (xbar, s with divisor n-1) with L = 0.
Run: /usr/bin/python3 make_mvue_n2_ref.py > mvue_n2_ref.json
"""
import json, sys, math
import numpy as np, scipy
from scipy import special

out = {"generator": "make_mvue_n2_ref.py", "python": sys.version.split()[0], "scipy": scipy.__version__,
       "numpy": np.__version__, "rows": []}
for x1, x2 in [(1.0, 3.0), (-1.0, 3.0), (-3.0, -1.0), (-0.2, 0.1), (0.5, 0.6), (-5.0, -4.9), (-2.0, 7.0)]:
    xbar = (x1 + x2) / 2
    s = float(np.std([x1, x2], ddof=1))
    q = xbar / s
    b = 0.5 - q * math.sqrt(2) / 2
    lim = float(special.betainc(1e-12, 1e-12, b)) if 0 < b < 1 else (0.0 if b <= 0 else 1.0)
    rb = 0.5 * ((xbar - s / math.sqrt(2) < 0) + (xbar + s / math.sqrt(2) < 0))
    out["rows"].append({"x1": x1, "x2": x2, "q": q, "betainc_limit": lim, "rao_blackwell": rb})
json.dump(out, sys.stdout, indent=1)
