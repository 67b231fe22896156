#!/usr/bin/python3
"""Reference values of the Madau 1995 (ApJ 441, 18) mean intergalactic transmission.

Written from the paper's published formulas, independently of skytally's code:
- Lyman-series line blanketing, tau_j = A_j (lambda_obs / lambda_j)^3.46 for
  lambda_j < lambda_obs < lambda_j (1 + z_em), with (lambda_j, A_j) = (1216, 3.6e-3),
  (1026, 1.7e-3), (973, 1.2e-3), (950, 9.3e-4)  (Madau 1995 eq. 12 for Lyman alpha and eq. 15 for
  Lyman beta to delta; equation numbers from memory).
- Photoelectric absorption for 912 < lambda_obs < 912 (1 + z_em), the closed-form approximation of
  Madau 1995 footnote 3 (from memory), x_c = lambda_obs / 912, x_em = 1 + z_em:
  tau = 0.25 x_c^3 (x_em^0.46 - x_c^0.46) + 9.4 x_c^1.5 (x_em^0.18 - x_c^0.18)
        - 0.7 x_c^3 (x_c^-1.32 - x_em^-1.32) - 0.023 (x_em^1.68 - x_c^1.68).
Arithmetic in mpmath at 30 digits. Also the transmission averaged over a top-hat band
[8000, 9000] Angstrom for f_lambda ~ lambda^beta counted in photons,
<T> = int T lambda^(beta+1) dlambda / int lambda^(beta+1) dlambda, by mpmath.quad split at the jumps.

Run from the repository root:
    /usr/bin/python3 test/reference/generate/igm.py
Writes test/reference/igm.json.
"""
import datetime
import json
import os

import mpmath

mpmath.mp.dps = 30
LINES = [(1216, mpmath.mpf("3.6e-3")), (1026, mpmath.mpf("1.7e-3")), (973, mpmath.mpf("1.2e-3")), (950, mpmath.mpf("9.3e-4"))]


def tau_lines(lam, z):
    lam = mpmath.mpf(lam)
    t = mpmath.mpf(0)
    for lj, aj in LINES:
        if lj < lam < lj * (1 + z):
            t += aj * (lam / lj) ** mpmath.mpf("3.46")
    return t


def tau_pe(lam, z):
    xc = mpmath.mpf(lam) / 912
    xem = 1 + mpmath.mpf(z)
    if not (1 < xc < xem):
        return mpmath.mpf(0)
    t = (mpmath.mpf("0.25") * xc ** 3 * (xem ** mpmath.mpf("0.46") - xc ** mpmath.mpf("0.46"))
         + mpmath.mpf("9.4") * xc ** mpmath.mpf("1.5") * (xem ** mpmath.mpf("0.18") - xc ** mpmath.mpf("0.18"))
         - mpmath.mpf("0.7") * xc ** 3 * (xc ** mpmath.mpf("-1.32") - xem ** mpmath.mpf("-1.32"))
         - mpmath.mpf("0.023") * (xem ** mpmath.mpf("1.68") - xc ** mpmath.mpf("1.68")))
    return max(t, mpmath.mpf(0))


def trans(lam, z):
    return mpmath.exp(-(tau_lines(lam, z) + tau_pe(lam, z)))


POINTS = []
for z in [2.0, 3.0, 4.0, 5.0, 6.0]:
    for rest in [1300, 1250, 1200, 1100, 1000, 960, 930, 915, 900, 850, 800, 700]:
        POINTS.append((rest * (1 + z), z))
POINTS += [(5000, 4.0), (5000, 3.0), (4400, 3.5), (6060, 4.0), (4000, 5.5)]

out = {
    "header": {
        "command": "/usr/bin/python3 test/reference/generate/igm.py",
        "libraries": {"mpmath": mpmath.__version__},
        "date": datetime.date.today().isoformat(),
        "what": "Madau 1995 mean IGM transmission (Lyman alpha-delta blanketing + footnote-3 photoelectric approximation), point values and top-hat band averages",
    },
    "points": [],
    "band_averages": [],
}
for lam, z in POINTS:
    out["points"].append({"lambda_obs": float(lam), "z": z, "tau_lines": float(tau_lines(lam, z)),
                          "tau_photoelectric": float(tau_pe(lam, z)), "transmission": float(trans(lam, z))})

LO, HI = 8000, 9000
for z in [5.0, 5.8, 6.2, 6.6, 7.0, 8.0]:
    for beta in [-2.0, -1.0]:
        jumps = sorted({LO, HI} | {lj * (1 + z) for lj, _ in LINES if LO < lj * (1 + z) < HI} | ({912 * (1 + z)} if LO < 912 * (1 + z) < HI else set()))
        w = lambda l: l ** (beta + 1)
        num = mpmath.quad(lambda l: trans(l, z) * w(l), jumps)
        den = mpmath.quad(w, [LO, HI])
        out["band_averages"].append({"band": [LO, HI], "z": z, "beta": beta, "transmission": float(num / den)})

path = os.path.join(os.path.dirname(__file__), "..", "igm.json")
with open(path, "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
print("wrote", path)
