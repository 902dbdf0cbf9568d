#!/usr/bin/python3
"""Reference values for lots/reduce, computed with Debian's numpy/scipy.

Run with Debian's own interpreter from the repository root:
    /usr/bin/python3 testdata/reduce/make_ref.py > testdata/reduce/ref.json

It checks the library routines lots/reduce relies on or hand-writes:
  - gonum stat.LinearRegression / stat.RSquared  vs scipy.stats.linregress
  - gonum integrate.Trapezoidal                  vs scipy.integrate.trapezoid
  - the hand-written local parabola (quadFit)    vs numpy.polyfit(deg=2)
  - the normal quartile 0.6745 in noiseSD        vs scipy.stats.norm.ppf(0.75)
The input arrays are written into the JSON so the Go test needs no Python.
"""
import json
import sys

import numpy as np
import scipy
from scipy import integrate, stats

rng = np.random.RandomState(20261202)
out = {"numpy": np.__version__, "scipy": scipy.__version__,
       "python": sys.version.split()[0]}

# An elastic line with noise: stress = 71000 strain - 20 + N(0, 0.8).
x = np.linspace(0.0005, 0.0035, 240)
y = 71000.0 * x - 20.0 + rng.normal(0.0, 0.8, x.size)
lr = stats.linregress(x, y)
resid = y - (lr.intercept + lr.slope * x)
out["linfit"] = {"x": x.tolist(), "y": y.tolist(), "slope": lr.slope,
                 "intercept": lr.intercept, "r2": lr.rvalue ** 2,
                 "residual_sd": float(np.sqrt(np.sum(resid ** 2) / (x.size - 2)))}

# A curve on an uneven strain grid.
xt = np.sort(rng.uniform(0.0, 0.2, 500))
xt[0] = 0.0
yt = 300.0 * (1.0 - np.exp(-xt / 0.004)) + 200.0 * xt + rng.normal(0, 0.5, xt.size)
out["trapezoid"] = {"x": xt.tolist(), "y": yt.tolist(),
                    "area": float(integrate.trapezoid(yt, xt))}

# A noisy top of a stress-strain curve; polyfit in the scaled variable
# u = (x - xc)/w over [xc - w, xc + w].
xq = np.linspace(0.07, 0.09, 81)
yq = 318.0 - 2.0e5 * (xq - 0.0812) ** 2 + rng.normal(0, 0.3, xq.size)
xc, w = 0.08, 0.01
c2, c1, c0 = np.polyfit((xq - xc) / w, yq, 2)
out["quadfit"] = {"x": xq.tolist(), "y": yq.tolist(), "xc": xc, "w": w,
                  "c": [float(c0), float(c1), float(c2)]}

out["norm_q75"] = float(stats.norm.ppf(0.75))
json.dump(out, sys.stdout, indent=1)
sys.stdout.write("\n")
