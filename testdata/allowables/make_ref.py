#!/usr/bin/python3
"""Reference values for lotproof's design-value checks (lots/allowables).

Run with Debian's python3 and python3-scipy/numpy (apt-get install python3-scipy):
    /usr/bin/python3 testdata/allowables/make_ref.py
Writes ref.json beside this script. Independent of lotproof's Go code.

1. Pooled normal case: NIST StRD SiRstv (silicon resistivity, 5 instruments x
   5 replicates; the .dat file as shipped in Debian python3-scipy, copied to
   testdata/stats/nist_anova). Mean and SD in exact rational arithmetic; the
   one-sided tolerance factors k = nct.ppf(gamma, n-1, z_p sqrt n)/sqrt n.
2. Weibull case: the ball-bearing fatigue data of Lieblein and Zelen (1956),
   J. Res. NBS 57, 273-316, as reproduced in Lawless (2003), Statistical Models
   and Methods for Lifetime Data, 2nd ed. (23 failure times, millions of
   revolutions; typed in from memory). The two-parameter MLE from the profile
   likelihood equation solved with brentq; the handbook closed-form B-basis
   (CMH-17-1G 8.3.4.3.2 approximation, formula as implemented: see
   stats.WeibullApproxV); the exact pivotal bound (Thoman, Bain and Antle 1970)
   by Monte Carlo with numpy's PCG64 (its own stream, not lotproof's), with a
   distribution-free 99.9% interval for the simulated quantile.
"""
import json, math, os, sys
from fractions import Fraction
import numpy as np, scipy
from scipy import stats, optimize

here = os.path.dirname(os.path.abspath(__file__))
out = {"generator": "make_ref.py", "python": sys.version.split()[0],
       "numpy": np.__version__, "scipy": scipy.__version__}

# 1. SiRstv
vals = []
with open(os.path.join(here, "..", "stats", "nist_anova", "SiRstv.dat")) as f:
    lines = f.read().splitlines()
for ln in lines[60:85]:
    inst, v = ln.split()
    vals.append((int(inst), v))
x = [Fraction(v) for _, v in vals]
n = len(x)
mean = sum(x) / n
var = sum((xi - mean) ** 2 for xi in x) / (n - 1)
sd = math.sqrt(float(var))
def k(n, p, g):
    return stats.nct.ppf(g, n - 1, stats.norm.ppf(p) * math.sqrt(n)) / math.sqrt(n)
kA, kB = k(n, 0.99, 0.95), k(n, 0.90, 0.95)
out["sirstv"] = {"n": n, "groups": [i for i, _ in vals], "values": [float(v) for _, v in vals],
                 "mean": float(mean), "sd": sd, "kA": kA, "kB": kB,
                 "a_basis": float(mean) - kA * sd, "b_basis": float(mean) - kB * sd}

# 2. Ball bearings
bb = np.array([17.88, 28.92, 33.00, 41.52, 42.12, 45.60, 48.48, 51.84, 51.96, 54.12, 55.56, 67.80,
               68.64, 68.64, 68.88, 84.12, 93.12, 98.64, 105.12, 105.84, 127.92, 128.04, 173.40])
def fit(x):
    lx = np.log(x)
    def g(b):  # profile likelihood equation for the shape b
        w = x ** b
        return (w * lx).sum() / w.sum() - 1 / b - lx.mean()
    b = optimize.brentq(g, 0.05, 50, xtol=1e-14, rtol=1e-15)
    a = ((x ** b).mean()) ** (1 / b)
    return b, a
beta, alpha = fit(bb)
n = len(bb)
res = {"n": n, "values": bb.tolist(), "shape": beta, "scale": alpha}
VB = 3.803 + math.exp(1.79 - 0.516 * math.log(n) + 5.1 / (n - 1))
VA = 6.649 + math.exp(2.55 - 0.526 * math.log(n) + 4.76 / n)
for name, p, V in (("a", 0.99, VA), ("b", 0.90, VB)):
    q = alpha * (-math.log(p)) ** (1 / beta)
    res[name + "_approx"] = q * math.exp(-V / (beta * math.sqrt(n)))

# Exact pivotal bound: T = (u_hat - w_p) / b_hat for samples from the standard
# extreme-value model (Weibull alpha = beta = 1); bound = exp(u - t_gamma b).
rng = np.random.Generator(np.random.PCG64(20261202))
N = 200000
samp = rng.exponential(size=(N, n))
lx = np.log(samp)
b = np.full(N, 1.0)
for _ in range(60):  # vectorized Newton on the profile equation in b (shape)
    w = samp ** b[:, None]
    s0, s1, s2 = w.sum(1), (w * lx).sum(1), (w * lx * lx).sum(1)
    g = s1 / s0 - 1 / b - lx.mean(1)
    dg = (s2 * s0 - s1 * s1) / (s0 * s0) + 1 / (b * b)
    b = np.clip(b - g / dg, b / 4, b * 4)
u_hat = np.log(((samp ** b[:, None]).mean(1)) ** (1 / b))
bhat = 1 / b  # log-scale b = 1/shape
u, bb_ = math.log(alpha), 1 / beta
for name, p in (("a", 0.99), ("b", 0.90)):
    wp = math.log(-math.log(p))
    T = np.sort((u_hat - wp) / bhat)
    g = 0.95
    i = int(math.ceil(g * N)) - 1
    half = int(math.ceil(3.3 * math.sqrt(N * g * (1 - g))))
    tq, tlo, thi = T[i], T[i - half], T[i + half]
    res[name + "_exact"] = math.exp(u - tq * bb_)
    res[name + "_exact_lo"] = math.exp(u - thi * bb_)
    res[name + "_exact_hi"] = math.exp(u - tlo * bb_)
res["sims"] = N
out["ball_bearings"] = res
json.dump(out, open(os.path.join(here, "ref.json"), "w"), indent=1)
print(json.dumps(out["ball_bearings"], indent=1)[:800])
print(out["sirstv"]["a_basis"], out["sirstv"]["b_basis"], kA, kB)
