#!/usr/bin/python3
"""Reference values for lotproof's report plots (lots/report/plot_ref_test.go).

Run with Debian's interpreter: /usr/bin/python3 make_plot_ref.py > plot_ref.json
Uses Debian python3-scipy / python3-numpy (versions written into the output).

Records:
  densities  scipy.stats norm.pdf, lognorm.pdf(s, scale=exp(mu)) and
             weibull_min.pdf(c, scale) over the whole range the histogram
             draws (far tails included), for parameter sets typical of
             strength data and a few extreme ones;
  quantiles  scipy.stats.norm.ppf of Benard's median ranks, the y positions
             of the normal probability plot, and log(-log1p(-p)) for the
             Weibull plot;
  medianrank exact median ranks beta.ppf(0.5, i, n-i+1), against which
             Benard's approximation (i-0.3)/(n+0.4) is checked;
  oc         operating characteristics: the variables plan "accept when
             (mean-L)/s >= k", Pa = nct.sf(k sqrt(n), n-1, sqrt(n) norm.ppf(1-p))
             with k = nct.ppf(gamma, n-1, sqrt(n) norm.ppf(content))/sqrt(n),
             and the attributes plan binom.cdf(c, n, p).
"""
import json
import math
import sys

import numpy as np
import scipy
from scipy import stats

out = {
    "generator": "make_plot_ref.py",
    "python": sys.version.split()[0],
    "scipy": scipy.__version__,
    "numpy": np.__version__,
}

dens = []
for mu, sigma in [(612.0, 14.0), (50.0, 0.5), (0.0, 1.0), (1e4, 3e3)]:
    xs = list(np.linspace(mu - 9 * sigma, mu + 9 * sigma, 37))
    dens.append({"dist": "normal", "p1": mu, "p2": sigma, "x": xs,
                 "pdf": [float(stats.norm.pdf(x, loc=mu, scale=sigma)) for x in xs]})
for mu, sigma in [(6.416, 0.0228), (0.0, 1.0), (3.0, 0.05)]:
    lo, hi = math.exp(mu - 8 * sigma), math.exp(mu + 8 * sigma)
    xs = list(np.linspace(lo, hi, 37))
    dens.append({"dist": "lognormal", "p1": mu, "p2": sigma, "x": xs,
                 "pdf": [float(stats.lognorm.pdf(x, sigma, scale=math.exp(mu))) for x in xs]})
for shape, scale in [(48.0, 618.0), (1.5, 2.0), (20.0, 350.0), (0.8, 10.0)]:
    xs = list(np.linspace(scale * 1e-3, scale * 1.6, 37))
    dens.append({"dist": "weibull", "p1": shape, "p2": scale, "x": xs,
                 "pdf": [float(stats.weibull_min.pdf(x, shape, scale=scale)) for x in xs]})
out["densities"] = dens

q = []
for n in [3, 5, 10, 30, 200]:
    ps = [(i - 0.3) / (n + 0.4) for i in range(1, n + 1)]
    q.append({"n": n,
              "normal": [float(stats.norm.ppf(p)) for p in ps],
              "weibull": [math.log(-math.log1p(-p)) for p in ps],
              "median_rank": [float(stats.beta.ppf(0.5, i, n - i + 1)) for i in range(1, n + 1)]})
out["quantiles"] = q

oc = []
ps = [0.001, 0.01, 0.02, 0.05, 0.1, 0.15, 0.2, 0.3, 0.4]
for n, content, gamma, c in [(5, 0.90, 0.90, 0), (10, 0.99, 0.95, 1), (30, 0.90, 0.95, 2), (3, 0.90, 0.75, 0)]:
    k = float(stats.nct.ppf(gamma, n - 1, math.sqrt(n) * stats.norm.ppf(content)) / math.sqrt(n))
    oc.append({"n": n, "content": content, "confidence": gamma, "c": c, "k": k, "p": ps,
               "pa_variables": [float(stats.nct.sf(k * math.sqrt(n), n - 1, math.sqrt(n) * stats.norm.ppf(1 - p))) for p in ps],
               "pa_attributes": [float(stats.binom.cdf(c, n, p)) for p in ps]})
out["oc"] = oc

json.dump(out, sys.stdout, indent=1)
sys.stdout.write("\n")
