#!/usr/bin/python3
"""Reference values for stats/control.go, capability.go and ewma.go.

Run with Debian's python3-scipy under /usr/bin/python3:
    /usr/bin/python3 testdata/trend/make_control_ref.py > testdata/trend/control_ref.json
Every value here is computed by scipy/numpy independently of lotproof.
"""
import json, math, sys
import numpy as np, scipy
from scipy import special, integrate, stats

out = {"generator": "testdata/trend/make_control_ref.py",
       "python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__}

def c4(n):
    return math.sqrt(2.0/(n-1)) * math.exp(special.gammaln(n/2.0) - special.gammaln((n-1)/2.0))

def d2(n):
    f = lambda x: 1 - stats.norm.cdf(x)**n - stats.norm.sf(x)**n
    v, err = integrate.quad(f, -np.inf, np.inf, epsabs=1e-13, epsrel=1e-13, limit=200)
    return v

consts = []
for n in list(range(2, 31)) + [40, 50, 75, 100, 200]:
    c = c4(n); d = d2(n); k = 3*math.sqrt(1-c*c)/c
    consts.append({"n": n, "c4": c, "d2": d, "A2": 3/(d*math.sqrt(n)), "A3": 3/(c*math.sqrt(n)),
                   "B3": max(0.0, 1-k), "B4": 1+k, "E2": 3/d})
out["constants"] = consts

rng = np.random.default_rng(20261202)

# Welch t-tests on fixed random samples.
welch = []
for (na, nb, sa, sb, shift) in [(5, 5, 1, 1, 0.5), (10, 4, 2, 0.5, 1.0), (3, 12, 14, 9, -20), (30, 25, 6, 6, 0.0)]:
    a = rng.normal(100, sa, na).round(3); b = rng.normal(100+shift, sb, nb).round(3)
    r = stats.ttest_ind(b, a, equal_var=False)
    va, vb = a.var(ddof=1)/na, b.var(ddof=1)/nb
    df = (va+vb)**2/(va*va/(na-1) + vb*vb/(nb-1))
    welch.append({"a": a.tolist(), "b": b.tolist(), "t": float(r.statistic), "p": float(r.pvalue), "df": df})
out["welch"] = welch

# Lower one-sided performance index with Bissell's bound and normal tail.
cap = []
for (n, mu, sd, lsl, conf) in [(10, 1000, 15, 930, 0.95), (25, 880, 14, 800, 0.95), (50, 318, 4, 300, 0.90), (5, 100, 3, 95, 0.99)]:
    x = rng.normal(mu, sd, n).round(2)
    m, s = x.mean(), x.std(ddof=1)
    idx = (m-lsl)/(3*s)
    z = stats.norm.ppf(conf)
    bound = idx - z*math.sqrt(1/(9*n) + idx*idx/(2*(n-1)))
    # exact bound for the one-sided index: 3*sqrt(n)*idx ~ noncentral t(n-1, 3*sqrt(n)*C)
    t_obs = 3*math.sqrt(n)*idx
    from scipy.optimize import brentq
    exact = brentq(lambda nc: stats.nct.sf(t_obs, n-1, nc) - (1-conf), -50, 200) / (3*math.sqrt(n))
    cap.append({"x": x.tolist(), "lower": lsl, "conf": conf, "mean": m, "sd": s, "index": idx,
                "bissell": bound, "exact_nct": exact, "fraction_below": float(stats.norm.cdf((lsl-m)/s))})
out["capability"] = cap

# Coverage of Bissell's bound by simulation (100000 samples each).
cov = []
for (n, C, conf) in [(10, 1.0, 0.95), (30, 1.33, 0.95), (50, 1.0, 0.90)]:
    reps = 100000
    x = rng.normal(0, 1, (reps, n))
    m = x.mean(axis=1); s = x.std(axis=1, ddof=1)
    lsl = -3*C
    idx = (m-lsl)/(3*s)
    z = stats.norm.ppf(conf)
    b = idx - z*np.sqrt(1/(9*n) + idx*idx/(2*(n-1)))
    cov.append({"n": n, "index": C, "conf": conf, "reps": reps, "coverage": float((b <= C).mean())})
out["bissell_coverage"] = cov

# Individuals chart and EWMA on a fixed series.
series = rng.normal(50, 2, 20).round(2)
base = series[:12]
mr = np.abs(np.diff(base)).mean()
sig = mr / (2/math.sqrt(math.pi))
out["individuals"] = {"x": base.tolist(), "center": base.mean(), "mrbar": mr, "sigma": sig,
                      "lcl": base.mean()-3*sig, "ucl": base.mean()+3*sig}
# median moving range: d4 = median of |Z1 - Z2| (Z1 - Z2 ~ N(0, 2)), checked
# also by simulation of 10^6 pairs
d4 = math.sqrt(2)*stats.norm.ppf(0.75)
pairs = rng.normal(0, 1, (1000000, 2))
d4sim = float(np.median(np.abs(pairs[:, 0]-pairs[:, 1])))
mmr = float(np.median(np.abs(np.diff(base))))
out["median_mr"] = {"d4": d4, "d4_simulated": d4sim, "median_mr": mmr, "sigma": mmr/d4,
                    "lcl": base.mean()-3*mmr/d4, "ucl": base.mean()+3*mmr/d4}
lam, L, mu0, s0 = 0.2, 3.0, 50.0, 2.0
z = mu0; pts = []
for i, v in enumerate(series, start=1):
    z = lam*v + (1-lam)*z
    w = L*s0*math.sqrt(lam/(2-lam)*(1-(1-lam)**(2*i)))
    pts.append([z, mu0-w, mu0+w])
out["ewma"] = {"x": series.tolist(), "lambda": lam, "L": L, "mu0": mu0, "sigma": s0, "points": pts}

json.dump(out, sys.stdout, indent=1)
print()
