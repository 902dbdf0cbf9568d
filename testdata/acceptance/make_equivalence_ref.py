# Reference values for stats/equivalence.go (mean-and-minimum test, Vangel
# 2002), made with Debian's /usr/bin/python3, python3-scipy and numpy:
#   /usr/bin/python3 make_equivalence_ref.py > equivalence_ref.json
# P(pass) = P(min Z_i >= -kmin, mean Z >= -kmean), Z_i ~ N(shift, 1) iid.
#  n = 2, 3: scipy.integrate quadrature over the region (independent of the
#            convolution method in lotproof);
#  n = 5, 10: Monte Carlo with numpy (seeded), reported with its standard error.
import json, sys, math
import numpy, scipy
from scipy import integrate, stats

out = {"scipy": scipy.__version__, "numpy": numpy.__version__, "quad": [], "mc": []}
phi = stats.norm.pdf
def quad2(km, kn, sh):
    c, s = -kn, -2 * km
    # z1 >= c, z2 >= max(c, s - z1)
    f = lambda z1: phi(z1 - sh) * stats.norm.sf(max(c, s - z1) - sh)
    v, e = integrate.quad(f, c, math.inf, epsabs=1e-14, epsrel=1e-12, limit=200, points=None)
    return v
def quad3(km, kn, sh):
    c, s = -kn, -3 * km
    def inner(z1):
        g = lambda z2: phi(z2 - sh) * stats.norm.sf(max(c, s - z1 - z2) - sh)
        v, _ = integrate.quad(g, c, math.inf, epsabs=1e-14, epsrel=1e-12, limit=200)
        return phi(z1 - sh) * v
    v, _ = integrate.quad(inner, c, math.inf, epsabs=1e-13, epsrel=1e-11, limit=200)
    return v
for n, fn in ((2, quad2), (3, quad3)):
    for km, kn in ((1.3, 2.1), (1.0, 2.3), (0.5, 1.5), (2.0, 1.0)):
        for sh in (0.0, -0.5, -1.5):
            out["quad"].append({"n": n, "kmean": km, "kmin": kn, "shift": sh, "p": fn(km, kn, sh)})
rng = numpy.random.default_rng(20020701)
for n, km, kn, sh in ((5, 0.85, 2.53, 0.0), (5, 0.85, 2.53, -0.7), (10, 0.61, 2.78, 0.0), (10, 0.61, 2.78, -0.4)):
    reps, hits = 0, 0
    for _ in range(20):
        z = rng.standard_normal((500000, n)) + sh
        ok = (z.min(axis=1) >= -kn) & (z.mean(axis=1) >= -km)
        hits += int(ok.sum()); reps += z.shape[0]
    p = hits / reps
    out["mc"].append({"n": n, "kmean": km, "kmin": kn, "shift": sh, "p": p, "se": math.sqrt(p * (1 - p) / reps), "reps": reps})
json.dump(out, sys.stdout, indent=1)
