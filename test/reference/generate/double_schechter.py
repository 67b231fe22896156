#!/usr/bin/python3
"""Reference integrals of the double Schechter function, computed independently with mpmath.

phi(L) dL = exp(-L/L*) [phi1* (L/L*)^alpha1 + phi2* (L/L*)^alpha2] dL/L*  

For each case: the number density above L_lim, n = integral_{L_lim}^inf phi(L) dL, and the
luminosity density above L_lim, j = integral_{L_lim}^inf L phi(L) dL, by direct quadrature of the
function as written (mpmath.quad in ln L, 30 digits) -- no incomplete gamma function is used.
Also, for alpha1, alpha2 > -2, the total luminosity density j_tot = integral_0^inf L phi(L) dL
(quadrature in v = (L/L*)^(1/10), which removes the integrable singularity at L = 0).

Run from the repository root:
    /usr/bin/python3 test/reference/generate/double_schechter.py
Writes test/reference/double_schechter.json.
"""
import datetime
import json
import os

import mpmath

mpmath.mp.dps = 30

# (phi1*, alpha1, phi2*, alpha2, L*, L_lim): invented parameter sets covering both signs of
# alpha + 1 and alpha + 2, limits below and above L*.
CASES = [
    (3.9e-3, -0.35, 7.9e-4, -1.47, 10 ** 10.66, 10 ** 8.5),
    (3.9e-3, -0.35, 7.9e-4, -1.47, 10 ** 10.66, 10 ** 10.9),
    (1.6e-3, -1.2, 2.0e-4, -1.8, 2.5e42, 1.0e40),
    (1.6e-3, -1.2, 2.0e-4, -2.3, 2.5e42, 1.0e41),
    (2.0e-3, 0.5, 5.0e-4, -1.9, 1.0, 0.05),
    (2.0e-3, -0.8, 0.0, -1.5, 3.0e41, 3.0e40),
]


def phi(l, p1, a1, p2, a2, ls):
    u = l / ls
    return mpmath.exp(-u) * (p1 * u ** a1 + p2 * u ** a2) / ls


def above(f, llim, ls):
    # integral over ln L from ln L_lim to ln(200 L*) (beyond, exp(-200) is negligible), split at L*.
    lo = mpmath.log(llim)
    pts = sorted({lo, max(lo, mpmath.log(ls)), mpmath.log(200 * ls)})
    return mpmath.quad(lambda t: f(mpmath.exp(t)) * mpmath.exp(t), pts)


out = {
    "header": {
        "command": "/usr/bin/python3 test/reference/generate/double_schechter.py",
        "libraries": {"mpmath": mpmath.__version__},
        "date": datetime.date.today().isoformat(),
        "what": "number and luminosity densities above a limit of double Schechter functions by direct mpmath quadrature (30 digits)",
    },
    "cases": [],
}
for p1, a1, p2, a2, ls, llim in CASES:
    n = above(lambda l: phi(l, p1, a1, p2, a2, ls), llim, ls)
    j = above(lambda l: l * phi(l, p1, a1, p2, a2, ls), llim, ls)
    row = {"phi1": p1, "alpha1": a1, "phi2": p2, "alpha2": a2, "l_star": ls, "l_lim": llim,
           "number_above": float(n), "luminosity_above": float(j)}
    if a1 > -2 and a2 > -2:
        # from 0: the integrand behaves like u^(alpha+1), an integrable singularity for alpha < -1;
        # the substitution u = v^10 (du = 10 v^9 dv) makes it smooth before quadrature.
        g = lambda u: u * mpmath.exp(-u) * (p1 * u ** a1 + p2 * u ** a2)
        jt = mpmath.quad(lambda v: g(v ** 10) * 10 * v ** 9, [0, 1, mpmath.mpf(200) ** mpmath.mpf('0.1')]) * ls
        row["luminosity_total"] = float(jt)
    out["cases"].append(row)

path = os.path.join(os.path.dirname(__file__), "..", "double_schechter.json")
with open(path, "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
print("wrote", path)
