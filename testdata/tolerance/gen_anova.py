#!/usr/bin/python3
"""Reference values for lotproof's ANOVA (between/within-group) tolerance bound.

Input data: NIST StRD one-way ANOVA datasets SiRstv and AtmWtAg (public, in
../stats/nist_anova/), used whole and in fixed subsets to make unbalanced groups
and a case with MSB < MSW. The bound follows CMH-17-1G Vol. 1 section 8.3.5.2:
  n' = (N - sum n_i^2/N)/(k-1), S = sqrt(MSB/n' + (n'-1)/n' MSW), u = MSB/MSW,
  w = sqrt(u/(u+n'-1)), T = (k0 - k1/sqrt(n') + (k1-k0) w)/(1 - 1/sqrt(n')),
  k0, k1 = scipy.stats.nct.ppf one-sided normal factors for N and k; bound = mean - T S;
  MSB <= MSW: pooled normal bound mean - k0 s on all values.
MSB/MSW from numpy sums, checked against scipy.stats.f_oneway's F.
Run: /usr/bin/python3 gen_anova.py > anova_bound.json
"""
import json, sys, math
import numpy as np, scipy
from scipy import stats

def read_nist(path):
    groups = {}
    data = False
    for line in open(path):
        if line.strip().startswith("Data:") and line.split()[1] == "Instrument":
            data = True
            continue
        if data and line.strip():
            g, v = line.split()
            groups.setdefault(int(g), []).append(float(v))
    return [groups[k] for k in sorted(groups)]

def kfac(n, p, g):
    return stats.nct.ppf(g, n - 1, stats.norm.ppf(p) * math.sqrt(n)) / math.sqrt(n)

def bound(groups, p, g):
    k = len(groups)
    sizes = np.array([len(x) for x in groups], float)
    N = sizes.sum()
    allv = np.concatenate([np.array(x) for x in groups])
    m = allv.mean()
    means = np.array([np.mean(x) for x in groups])
    ssb = float(np.sum(sizes * (means - m) ** 2))
    ssw = float(sum(np.sum((np.array(x) - np.mean(x)) ** 2) for x in groups))
    msb, msw = ssb / (k - 1), ssw / (N - k)
    F = stats.f_oneway(*groups).statistic
    assert abs(F - msb / msw) < 1e-6 * F, (F, msb / msw)
    k0 = kfac(int(N), p, g)
    assert math.isfinite(k0)
    if msb <= msw:
        s = allv.std(ddof=1)
        return {"method": "anova-pooled", "value": m - k0 * s, "factor": k0, "MSB": msb, "MSW": msw}
    ne = (N - np.sum(sizes ** 2) / N) / (k - 1)
    S = math.sqrt(msb / ne + (ne - 1) / ne * msw)
    u = msb / msw
    w = math.sqrt(u / (u + ne - 1))
    k1 = kfac(k, p, g)
    T = (k0 - k1 / math.sqrt(ne) + (k1 - k0) * w) / (1 - 1 / math.sqrt(ne))
    return {"method": "anova", "value": m - T * S, "factor": T, "MSB": msb, "MSW": msw,
            "nEff": ne, "S": S, "k0": k0, "k1": k1, "w": w}

si = read_nist("../stats/nist_anova/SiRstv.dat")
ag = read_nist("../stats/nist_anova/AtmWtAg.dat")
cases = {
    "SiRstv": si,
    "SiRstv-unbalanced": [si[0][:2], si[1], si[2][:4], si[3][:3], si[4]],
    "SiRstv-unbalanced-2": [si[i][:n] for i, n in enumerate((5, 2, 5, 5, 3))],
    "SiRstv-groups-1-4": [si[0], si[3]],
    "AtmWtAg": ag,
    "AtmWtAg-unbalanced": [ag[0][:10], ag[1]],
}
# A subset with MSB < MSW: search pairs/triples of SiRstv instruments in fixed order.
import itertools
for c in itertools.combinations(range(5), 3):
    gs = [si[i] for i in c]
    if stats.f_oneway(*gs).statistic < 1:
        cases["SiRstv-MSB<MSW-" + "".join(str(i + 1) for i in c)] = gs
        break
out = {"generator": "gen_anova.py", "python": sys.version.split()[0], "scipy": scipy.__version__,
       "numpy": np.__version__, "cases": []}
for name, gs in cases.items():
    for p, g in [(0.90, 0.95), (0.99, 0.95), (0.80, 0.90)]:
        r = bound(gs, p, g)
        r.update({"name": name, "p": p, "gamma": g, "groups": gs})
        out["cases"].append(r)
json.dump(out, sys.stdout, indent=1)
