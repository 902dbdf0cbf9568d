#!/usr/bin/python3
"""Independent recomputation of a lotproof trend, for lots/trend tests.

Makes a synthetic lot history (random numbers, not the demo scenario) and
recomputes, with numpy/scipy and nothing from lotproof, everything
`lotproof trend` reports for it: per supplier/property/quarter the counts,
mean, SD, Ppk, Bissell's bound and ppm below the minimum; per series the
Phase I baseline (median-moving-range screen), the individuals limits (per
lot: centre +- 3 sqrt(sigma_b^2 + sigma_w^2/n_i), the x-bar chart with variable
sample size of Montgomery, Introduction to Statistical Quality Control, 7th ed.,
section 6.3.2, extended by a between-lot component), the
S chart limits, the EWMA and the signals of the four Western Electric rules,
the EWMA, the S chart and the Welch shift test on lot means.

    /usr/bin/python3 testdata/trend/make_trend_ref.py
writes ref_history.csv and trend_ref.json next to this script.
"""
import csv, io, json, math, os, sys
import numpy as np, scipy
from scipy import stats, special

here = os.path.dirname(os.path.abspath(__file__))
rng = np.random.default_rng(7345)
quarters = [(2024, 1), (2024, 2), (2024, 3), (2024, 4), (2025, 1), (2025, 2), (2025, 3)]
MIN = {"tensile": 930.0, "proof": 800.0}
rows = []
for sup, code, per_q, shift_from in [("Ondrake Works", "AW", 2, None), ("Vellmark Foundry", "BF", 3, 5)]:
    for qi, (y, q) in enumerate(quarters):
        for l in range(per_q):
            lot = "%s-%d%d-%d" % (code, y % 100, q, l + 1)
            n = 4 + (qi + l) % 3            # 4, 5 or 6 specimens
            day = 1 + int(rng.integers(0, 80))
            month = 3 * (q - 1) + 1 + (day - 1) // 28
            tested = "%04d-%02d-%02d" % (y, month, 1 + (day - 1) % 28)
            shift = -25.0 if (shift_from is not None and qi >= shift_from) else 0.0
            mt = 1005 + shift + 6 * rng.normal()
            mp = 875 + shift + 6 * rng.normal()
            for s in range(n):
                rows.append([lot + "-%d" % (s + 1), lot, sup, "bar", tested,
                             "%.1f" % (mt + 14 * rng.normal()), "%.1f" % (mp + 14 * rng.normal())])
buf = io.StringIO()
w = csv.writer(buf, lineterminator="\n")
w.writerow(["specimen", "lot", "supplier", "material", "tested", "tensile [MPa]", "proof [MPa]"])
w.writerows(rows)
open(os.path.join(here, "ref_history.csv"), "w").write(buf.getvalue())

def c4(n):
    return math.sqrt(2.0 / (n - 1)) * math.exp(special.gammaln(n / 2.0) - special.gammaln((n - 1) / 2.0))

def quarter(d):
    return "%s-Q%d" % (d[:4], (int(d[5:7]) - 1) // 3 + 1)

out = {"generator": "testdata/trend/make_trend_ref.py", "python": sys.version.split()[0],
       "numpy": np.__version__, "scipy": scipy.__version__, "periods": [], "series": [], "signals": []}
conf, lam, L, alpha = 0.95, 0.2, 3.0, 0.01
z95 = stats.norm.ppf(conf)
d2 = 2 / math.sqrt(math.pi)
d4 = math.sqrt(2) * stats.norm.ppf(0.75)
for sup in ["Ondrake Works", "Vellmark Foundry"]:
    for pi, prop in [(6, "proof"), (5, "tensile")]:
        lots = {}
        for r in rows:
            if r[2] == sup:
                lots.setdefault(r[1], {"tested": r[4], "vals": []})["vals"].append(float(r[pi]))
        order = sorted(lots, key=lambda k: (lots[k]["tested"], k))
        periods = sorted({quarter(lots[k]["tested"]) for k in order})
        base_p = set(periods[:4])
        for p in periods:
            v = np.array([x for k in order if quarter(lots[k]["tested"]) == p for x in lots[k]["vals"]])
            m, s = v.mean(), v.std(ddof=1)
            ppk = (m - MIN[prop]) / (3 * s)
            n = len(v)
            out["periods"].append({"group": sup, "property": prop, "period": p,
                                   "lots": sum(1 for k in order if quarter(lots[k]["tested"]) == p), "specimens": n,
                                   "mean": m, "sd": s, "ppk": ppk,
                                   "ppk_lower": ppk - z95 * math.sqrt(1 / (9 * n) + ppk * ppk / (2 * (n - 1))),
                                   "ppm_below": 1e6 * stats.norm.cdf((MIN[prop] - m) / s)})
        means = np.array([np.mean(lots[k]["vals"]) for k in order])
        sds = np.array([np.std(lots[k]["vals"], ddof=1) for k in order])
        ns = np.array([len(lots[k]["vals"]) for k in order])
        per = [quarter(lots[k]["tested"]) for k in order]
        base = np.array([p in base_p for p in per])
        bm = means[base]
        med = np.median(np.abs(np.diff(bm)))
        tc, ts = bm.mean(), med / d4
        base = base & (means >= tc - 3 * ts) & (means <= tc + 3 * ts)
        bm = means[base]
        mr = np.abs(np.diff(bm)).mean()
        c, sig = bm.mean(), mr / d2
        bs, bn = sds[base], ns[base]
        equal = len(set(bn)) == 1
        sbar = bs.mean() if equal else math.sqrt(((bn - 1) * bs ** 2).sum() / (bn - 1).sum())
        # Per-lot sigma of the lot mean, one-way random-effects model:
        # Var(mean_i) = sb2 + sw^2/n_i; sw = sbar/c4(n) (equal sizes) or the
        # pooled SD over c4(df+1) (unequal); sb2 = max(0, sig^2 - sw^2 mean(1/n_j)).
        sw = sbar / (c4(int(bn[0])) if equal else c4(int((bn - 1).sum()) + 1))
        h = np.mean(1.0 / bn)
        sb2 = max(0.0, sig ** 2 - sw ** 2 * h)
        lot_sig = np.sqrt(sb2 + sw ** 2 / ns)
        sig = math.sqrt(sb2 + sw ** 2 * h)   # root-mean-square over the baseline: series sigma, EWMA
        z = c; ew = []
        for i, x in enumerate(means, start=1):
            z = lam * x + (1 - lam) * z
            wdt = L * sig * math.sqrt(lam / (2 - lam) * (1 - (1 - lam) ** (2 * i)))
            ew.append([z, c - wdt, c + wdt])
        sl = []
        for n in ns:
            k = 3 * math.sqrt(1 - c4(n) ** 2) / c4(n)
            sl.append([max(0, 1 - k) * sbar, (1 + k) * sbar])
        out["series"].append({"group": sup, "property": prop, "baseline_lots": int(base.sum()),
                              "excluded": [order[i] for i in range(len(order)) if per[i] in base_p and not base[i]],
                              "center": c, "mr_bar": mr, "sigma": sig, "lcl": c - 3 * sig, "ucl": c + 3 * sig,
                              "s_bar": sbar, "lots": order, "ewma": ew, "s_limits": sl,
                              "lot_limits": [[c - 3 * v, c + 3 * v] for v in lot_sig]})
        zz = (means - c) / lot_sig
        for i in range(len(order)):
            side = 1 if zz[i] >= 0 else -1
            if abs(zz[i]) > 3:
                out["signals"].append(["we1", sup, prop, order[i]])
            if i >= 2 and side * zz[i] > 2 and sum(side * zz[j] > 2 for j in range(i - 2, i + 1)) >= 2:
                out["signals"].append(["we2", sup, prop, order[i]])
            if i >= 4 and side * zz[i] > 1 and sum(side * zz[j] > 1 for j in range(i - 4, i + 1)) >= 4:
                out["signals"].append(["we3", sup, prop, order[i]])
            if i >= 7 and zz[i] != 0 and all(side * zz[j] > 0 for j in range(i - 7, i + 1)):
                out["signals"].append(["we4", sup, prop, order[i]])
            if ew[i][0] < ew[i][1] or ew[i][0] > ew[i][2]:
                out["signals"].append(["ewma", sup, prop, order[i]])
            if sds[i] > sl[i][1] or (sl[i][0] > 0 and sds[i] < sl[i][0]):
                out["signals"].append(["s_chart", sup, prop, order[i]])
        for a, b in zip(periods, periods[1:]):
            ma = [means[i] for i in range(len(order)) if per[i] == a]
            mb = [means[i] for i in range(len(order)) if per[i] == b]
            if len(ma) >= 2 and len(mb) >= 2:
                r = stats.ttest_ind(mb, ma, equal_var=False)
                if r.pvalue < alpha:
                    out["signals"].append(["shift_welch", sup, prop, b])
json.dump(out, open(os.path.join(here, "trend_ref.json"), "w"), indent=1)
print(len(rows), "specimens;", len(out["signals"]), "signals:", out["signals"])
