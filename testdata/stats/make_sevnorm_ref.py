"""Quantiles of X = sqrt(rho) Z + sqrt(1 - rho) e, Z standard normal and e
the standardized smallest-extreme-value variable (mean 0, variance 1), for
stats.sevNormalQuantile. The distribution function is integrated by
scipy.integrate.quad over the SEV variable with scipy.stats.gumbel_l (the
smallest extreme value law) and scipy.stats.norm, and solved by
scipy.optimize.brentq. Deterministic (no random numbers).
"""
import json
import math

import numpy
import scipy
from scipy import integrate, optimize, stats

cs = math.pi / math.sqrt(6.0)
g = 0.5772156649015329  # Euler-Mascheroni: -mean of gumbel_l


def cdf(x, rho):
    a, b = math.sqrt(rho), math.sqrt(1.0 - rho)
    # e = (G + gamma)/cs, G ~ gumbel_l; P(a Z + b e <= x) = E[Phi((x - b e)/a)]
    f = lambda u: stats.gumbel_l.pdf(u) * stats.norm.cdf((x - b * (u + g) / cs) / a)
    return integrate.quad(f, -40, 8, limit=200, epsabs=1e-13, epsrel=1e-12)[0]


rows = []
for rho in [0.05, 0.2, 0.4, 0.5, 0.6, 0.8, 0.95]:
    for alpha in [0.01, 0.05, 0.10]:
        q = optimize.brentq(lambda x: cdf(x, rho) - alpha, -8, 3, xtol=1e-12)
        rows.append({"rho": rho, "alpha": alpha, "quantile": q})
for alpha in [0.01, 0.05, 0.10]:
    # the pure SEV quantile, standardized, from gumbel_l.ppf
    rows.append({"rho": 0.0, "alpha": alpha, "quantile": (stats.gumbel_l.ppf(alpha) + g) / cs})
print(json.dumps({"scipy": scipy.__version__, "numpy": numpy.__version__, "rows": rows}, indent=1))
