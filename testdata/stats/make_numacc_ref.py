#!/usr/bin/python3
"""NIST StRD univariate NumAcc1-4: construction, certified values, exact checks.

Run: /usr/bin/python3 make_numacc_ref.py > numacc_ref.json

The NumAcc data files do not ship in Debian's scipy/numpy, and there is no web
access here. The data sets and certified values are written below FROM MEMORY
of the NIST StRD univariate summary statistics pages (NumAcc1: 3 values;
NumAcc2-4: 1001 values, the centre value then 500 alternating pairs). The
script confirms that the certified mean and standard deviation follow exactly
from that construction (rational arithmetic on the decimal values), and also
records the exact mean/SD of the values as rounded to binary64 (what any
program actually receives), which bounds the achievable accuracy.
"""
import json
import sys
from decimal import Decimal
from fractions import Fraction


def construct(centre, lo, hi, pairs):
    return [centre] + [lo, hi] * pairs


SETS = {
    # name: (decimal strings, certified mean, certified sample SD) -- from memory
    "NumAcc1": (["10000001", "10000003", "10000002"], "10000002", "1"),
    "NumAcc2": (construct("1.2", "1.1", "1.3", 500), "1.2", "0.1"),
    "NumAcc3": (construct("1000000.2", "1000000.1", "1000000.3", 500), "1000000.2", "0.1"),
    "NumAcc4": (construct("10000000.2", "10000000.1", "10000000.3", 500), "10000000.2", "0.1"),
}


def mean_sd(vals):
    n = len(vals)
    m = sum(vals, Fraction(0)) / n
    var = sum(((v - m) ** 2 for v in vals), Fraction(0)) / (n - 1)
    return m, var


def sqrt_fraction(f):
    # 40-digit square root of a rational, printed to 20 significant digits.
    d = Decimal(f.numerator) / Decimal(f.denominator)
    return float(d.sqrt())


out = {"python": sys.version.split()[0], "sets": []}
for name, (strs, cm, csd) in SETS.items():
    exact = [Fraction(Decimal(s)) for s in strs]
    m, var = mean_sd(exact)
    assert m == Fraction(Decimal(cm)), name
    assert var == Fraction(Decimal(csd)) ** 2, name
    binary = [Fraction(float(s)) for s in strs]
    mb, varb = mean_sd(binary)
    out["sets"].append({
        "name": name, "n": len(strs), "x": [float(s) for s in strs],
        "certified_mean": float(cm), "certified_sd": float(csd),
        "binary64_exact_mean": float(mb), "binary64_exact_sd": sqrt_fraction(varb),
    })
json.dump(out, sys.stdout, indent=1)
print()
