# Reference values for stats/sampling.go, made with Debian's /usr/bin/python3
# and python3-scipy:  /usr/bin/python3 make_sampling_ref.py > sampling_ref.json
import json, sys
import numpy, scipy
from scipy import stats

out = {"scipy": scipy.__version__, "numpy": numpy.__version__, "oc": [], "binom": [], "designs": []}
z = stats.norm.isf
# Exact OC of variables plans: Pa = P(T >= k sqrt(n)), T ~ nct(n-1, sqrt(n) z_(1-p)).
for n in [3, 5, 10, 20, 42, 100]:
    for k in [0.5, 1.2, 1.9, 2.5]:
        for p in [0.001, 0.01, 0.03, 0.06, 0.1, 0.25, 0.5]:
            out["oc"].append({"n": n, "k": k, "p": p,
                              "pa": float(stats.nct.sf(k * n ** 0.5, n - 1, z(p) * n ** 0.5))})
for n in [5, 20, 89, 110, 500]:
    for c in [0, 1, 2, 3, 10]:
        for p in [0.005, 0.01, 0.06, 0.2]:
            out["binom"].append({"n": n, "c": c, "p": p, "pa": float(stats.binom.cdf(c, n, p))})
# Plans by brute-force search (independent of lotproof's search order).
for p1, p2, a, b in [(0.01, 0.06, 0.05, 0.10), (0.02, 0.08, 0.05, 0.10), (0.005, 0.03, 0.05, 0.10), (0.01, 0.10, 0.10, 0.10)]:
    k = (z(p1) * z(b) + z(p2) * z(a)) / (z(a) + z(b))
    wn = (1 + k * k / 2) * ((z(a) + z(b)) / (z(p1) - z(p2))) ** 2
    for n in range(2, 5000):
        kh = stats.nct.ppf(a, n - 1, z(p1) * n ** 0.5) / n ** 0.5
        kl = stats.nct.ppf(1 - b, n - 1, z(p2) * n ** 0.5) / n ** 0.5
        if kl <= kh:
            break
    for c in range(0, 100):
        m = c + 1
        while stats.binom.cdf(c, m, p2) > b:
            m += 1
        if stats.binom.cdf(c, m, p1) >= 1 - a:
            break
    out["designs"].append({"p1": p1, "p2": p2, "alpha": a, "beta": b, "wallis_n": wn, "wallis_k": k,
                           "n": n, "kmin": kl, "kmax": kh, "attr_n": m, "attr_c": c})
json.dump(out, sys.stdout, indent=1)
