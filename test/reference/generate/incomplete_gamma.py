#!/usr/bin/python3
"""Reference values of the upper incomplete gamma function Gamma(s, x) (not regularised).

Source: mpmath.gammainc(s, a=x) (upper tail from x to infinity), evaluated with 40 significant
digits and rounded to double precision. Covers s in [-3, 3], including s = 0 (E1), negative
integers, s within 1e-10 and 1e-6 of 0 and of the negative integers, and x log-spaced from 1e-6
to 50, plus a few large-x rows (100 to 700). Also E1(x) from mpmath.e1 for the s = 0 identity.

Run from the repository root:
    /usr/bin/python3 test/reference/generate/incomplete_gamma.py
Writes test/reference/incomplete_gamma.json.
"""
import datetime
import json
import os
import platform
import sys

import mpmath

mpmath.mp.dps = 40

S_VALUES = [
    -3.0, -3.0 + 1e-10, -3.0 + 1e-6, -2.9, -2.5, -2.3,
    -2.0 - 1e-6, -2.0 - 1e-10, -2.0, -2.0 + 1e-10, -2.0 + 1e-6, -1.7, -1.5, -1.2,
    -1.0 - 1e-6, -1.0 - 1e-10, -1.0, -1.0 + 1e-10, -1.0 + 1e-6, -0.9, -0.5, -0.3,
    -1e-6, -1e-10, 0.0, 1e-10, 1e-6,
    0.3, 0.5, 0.9, 1.0, 1.5, 2.0, 2.5, 3.0,
]
X_SMALL_TO_50 = [float(mpmath.mpf(10) ** (mpmath.mpf(k) / 4)) for k in range(-24, 7)]  # 1e-6 .. 31.6
X_SMALL_TO_50 += [40.0, 50.0]
X_LARGE = [100.0, 300.0, 700.0]


def group_of(s):
    if s > 0.5:
        return "s > 0.5"
    if s > 0:
        return "0 < s <= 0.5"
    if s == 0:
        return "s = 0 (E1)"
    if s > -0.5:
        return "-0.5 < s < 0"
    nearest = round(s)
    if abs(s - nearest) < 1e-5:
        return "s at or within 1e-5 of a negative integer"
    return "s < -0.5, not near an integer"


def main():
    rows = []
    for s in S_VALUES:
        for x in X_SMALL_TO_50 + X_LARGE:
            v = mpmath.gammainc(mpmath.mpf(s), a=mpmath.mpf(x))
            fv = float(v)
            if not (abs(fv) > 1e-300) or fv == float("inf"):
                continue  # below double range: the function may underflow to 0 there
            rows.append({
                "group": group_of(s) + (" (x >= 100)" if x >= 100 else ""),
                "s": s,
                "x": x,
                "value": fv,
            })
    e1 = [{"x": x, "value": float(mpmath.e1(mpmath.mpf(x)))} for x in X_SMALL_TO_50]
    out = {
        "header": {
            "command": "/usr/bin/python3 test/reference/generate/incomplete_gamma.py",
            "what": "upper incomplete gamma Gamma(s, x) = integral_x^inf t^(s-1) e^-t dt, not regularised",
            "source": "mpmath.gammainc(s, a=x), mpmath.e1(x); mp.dps = 40, rounded to float64",
            "libraries": {"mpmath": mpmath.__version__, "python": platform.python_version()},
            "date": datetime.date.today().isoformat(),
        },
        "rows": rows,
        "e1": e1,
    }
    here = os.path.dirname(os.path.abspath(__file__))
    path = os.path.join(here, "..", "incomplete_gamma.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")
    print(f"wrote {len(rows)} rows to {os.path.normpath(path)}", file=sys.stderr)


if __name__ == "__main__":
    main()
