# Reference for the scale benchmarks (issue 12): the per-lot work of
# `lotproof accept` as an engineer would script it with pandas + scipy.
# Not run by CI. Run with Debian's own python3-pandas and python3-scipy:
#   apt-get install -y python3-pandas python3-scipy
#   /usr/bin/python3 pandas_reference.py FILE.csv CONTENT CONFIDENCE MIN_N \
#       "tensile [MPa]=950" ["proof [MPa]=850" ...] > out.csv
# For every lot and minimum: n, mean, SD (n-1), minimum, the exact one-sided
# normal tolerance factor k = t'_{gamma}(n-1, z_p sqrt(n)) / sqrt(n)
# (noncentral t quantile, scipy.stats.nct.ppf), the bound mean - k SD and
# a verdict: conforming when the bound meets the minimum with at least
# MIN_N specimens, otherwise not. lotproof does more per lot (confidence
# bounds on the fraction beyond the limit, the MVUE of that fraction, the
# mean bound, the outlier screen, the specimens needed), so the ratio
# flatters the script.
import sys
import numpy as np
import pandas as pd
from scipy import stats

path, p, g, min_n = sys.argv[1], float(sys.argv[2]), float(sys.argv[3]), int(sys.argv[4])
limits = [a.rsplit("=", 1) for a in sys.argv[5:]]
cols = [c for c, _ in limits]
df = pd.read_csv(path, usecols=["lot"] + cols, dtype={"lot": str})
agg = df.groupby("lot", sort=False)[cols].agg(["count", "mean", "std", "min"])
zp = stats.norm.ppf(p)
out = []
for col, lim in limits:
    a = agg[col]
    n = a["count"].to_numpy()
    with np.errstate(invalid="ignore", divide="ignore"):
        k = stats.nct.ppf(g, n - 1, zp * np.sqrt(n)) / np.sqrt(n)
    bound = a["mean"].to_numpy() - k * a["std"].to_numpy()
    verdict = np.where((bound >= float(lim)) & (n >= min_n), "conforming", "not conforming")
    out.append(pd.DataFrame({"lot": a.index, "property": col, "n": n, "mean": a["mean"].to_numpy(),
                             "sd": a["std"].to_numpy(), "min": a["min"].to_numpy(), "k": k,
                             "tolerance_bound": bound, "verdict": verdict}))
res = pd.concat(out)
res.to_csv(sys.stdout, index=False)
print("lots %d, conforming %d" % (len(agg), (res.groupby("lot", sort=False)["verdict"].apply(lambda v: (v == "conforming").all())).sum()), file=sys.stderr)
