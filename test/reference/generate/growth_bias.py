#!/usr/bin/python3
"""Reference values for a bias given as {over_growth: B}: b(z) = B / D(z).

D(z) is the linear growth factor of flat Lambda-CDM without radiation (Omega_Lambda = 1 - Omega_m),
normalised to D(0) = 1, from the hypergeometric closed form D(a) ∝ a 2F1(1/3, 1; 11/6; -a^3 OL/Om)
(scipy.special.hyp2f1), independent of the TypeScript code (which integrates the growing mode by
Gauss-Legendre quadrature). Each value is cross-checked against the growing-mode integral
D ∝ E(a) ∫_0^a da' / (a' E(a'))^3 by scipy.integrate.quad.

Holds, per cosmology: D and 0.84 / D at the slice middles of the tests' surveys
(test/survey/growth-bias.test.ts, test/published/growth-bias.test.ts), and a table of 1,000 rows of
B / D(z) over 0.6 <= z <= 1.6 (the dense table the tests compare the form with).

Run:  python3 test/reference/generate/growth_bias.py > test/reference/growth_bias.json
"""
import datetime
import json
import math
import sys

import numpy as np
import scipy
from scipy import integrate, special

B = 0.84

COSMOLOGIES = [
    # invented round-number case
    {"name": "round", "omega_m": 0.3},
    # Planck 2018 VI Table 2 (TT,TE,EE+lowE+lensing+BAO), the planck2018 preset of src/cosmology/presets.ts
    {"name": "planck2018", "omega_m": 0.3111},
]

# slice middles: five slices of 0.2 over 0.6 to 1.6, and the published check's edges
# [0.6, 0.8, 0.9, 1.1, 1.3, 1.5, 1.6] (middles 0.7, 0.85, 1.0, 1.2, 1.4, 1.55)
Z_POINTS = sorted({0.0, 0.7, 0.9, 1.1, 1.3, 1.5, 0.85, 1.0, 1.2, 1.4, 1.55})

TABLE_ROWS = 1000
TABLE_MIN, TABLE_MAX = 0.6, 1.6


def growth_hyp2f1(om, z):
    ol = 1.0 - om
    g = lambda a: a * special.hyp2f1(1.0 / 3.0, 1.0, 11.0 / 6.0, -a ** 3 * ol / om)
    return g(1.0 / (1.0 + z)) / g(1.0)


def growth_integral(om, z):
    ol = 1.0 - om
    e = lambda a: math.sqrt(om / a ** 3 + ol)
    g = lambda a: e(a) * integrate.quad(lambda x: 1.0 / (x * e(x)) ** 3, 0.0, a, epsabs=0, epsrel=1e-13)[0]
    return g(1.0 / (1.0 + z)) / g(1.0)


def main():
    out = {
        "header": {
            "command": "python3 test/reference/generate/growth_bias.py > test/reference/growth_bias.json",
            "libraries": {"python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__},
            "date": datetime.date.today().isoformat(),
            "method": "D(z) = a 2F1(1/3, 1; 11/6; -a^3 OL/Om) / 2F1(1/3, 1; 11/6; -OL/Om), a = 1/(1+z), OL = 1 - Om "
                      "(scipy.special.hyp2f1), each value checked against the growing-mode integral by scipy.integrate.quad "
                      "to 1e-10; bias = B / D",
            "b": B,
        },
        "cosmologies": [],
    }
    for c in COSMOLOGIES:
        om = c["omega_m"]
        points = []
        for z in Z_POINTS:
            d = growth_hyp2f1(om, z)
            di = growth_integral(om, z)
            assert abs(d / di - 1) < 1e-10, (z, d, di)
            points.append({"z": z, "d": d, "bias": B / d})
        zs = np.linspace(TABLE_MIN, TABLE_MAX, TABLE_ROWS)
        table = [[float(z), B / growth_hyp2f1(om, float(z))] for z in zs]
        out["cosmologies"].append({"name": c["name"], "omega_m": om, "points": points, "bias_table": table})
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
