#!/usr/bin/env python3
"""Independent slice limits and counts of narrow-band line surveys where the filter passes none of a
population's lines at some slice's middle redshift (test/selection/filter-gap-limit.test.ts), from
docs/survey-file.md's definitions alone (flat Lambda-CDM without radiation; shares no code with
skytally):
- a line of rest wavelength l emitted at z is seen at l (1 + z) with the filter's transmission T
  there, relative to its peak (top hat: 1 within center +- fwhm / 2; table: linear between rows, 0
  outside); with blended lines the measured flux is L (T(l0 (1 + z)) + sum_i r_i T(l_i (1 + z)))
  / (4 pi D_L^2), so the limit in the line's own luminosity at z is
  log10 L_lim = log10(4 pi D_L^2 F_lim / (T_0 + sum_i r_i T_i)), and none where that sum is 0;
- a population's window is where one of its lines is inside the filter; on a file's explicit slice
  edges a population's slices are those edges cut at its window's ends (slices wholly outside left
  out); a slice's limit is taken at its middle;
- the count is area x int dz dV/dz phi* int_{x_lim}^inf t^alpha e^-t dt over the slice's part in
  the window (cut where each line meets a filter edge or row).
Comoving distance and dV/dz by scipy.integrate.quad (epsrel 1e-13), the Schechter integral by
quad (epsrel 1e-12), the z integral by quad (epsrel 1e-11) between the cuts. Writes JSON to
stdout (scipy 1.17.1, numpy, Python 3.11).

Run: python3 test/reference/generate/filter_gap_limits.py > test/reference/filter_gap_limits.json
"""
import json

import numpy as np
from scipy import integrate

C_KMS = 299792.458
H0, OM = 70.0, 0.3
MPC_CM = 3.0856775814913673e24


def e(z):
    return np.sqrt(OM * (1 + z) ** 3 + 1 - OM)


def comoving(z):
    return C_KMS / H0 * integrate.quad(lambda x: 1 / e(x), 0, z, epsabs=0, epsrel=1e-13)[0]


def dv_dz_sr(z):
    return C_KMS / H0 * comoving(z) ** 2 / e(z)


def d_l_cm(z):
    return (1 + z) * comoving(z) * MPC_CM


def tophat(center, fwhm):
    lo, hi = center - fwhm / 2, center + fwhm / 2
    return (lambda lam: 1.0 if lo <= lam <= hi else 0.0), [lo, hi]


def table(rows):
    lam = np.array([r[0] for r in rows], float)
    t = np.array([r[1] for r in rows], float)
    t = t / t.max()
    return (lambda x: float(np.interp(x, lam, t, left=0.0, right=0.0))), list(lam)


def population_case(filt, knots, flux, area, pop, edges):
    """Limits at the slices' reference redshifts and counts, for one population."""
    lines = [(pop["line"], 1.0)] + pop.get("blended", [])
    sr = area * (np.pi / 180) ** 2
    phi, l_star, alpha = 10 ** pop["log10_phi_star"], 10 ** pop["log10_l_star"], pop["alpha"]
    # the window: where one of the lines is inside the filter
    w_min = min(knots[0] / l - 1 for l, _ in lines)
    w_max = max(knots[-1] / l - 1 for l, _ in lines)
    cuts = sorted({k / l - 1 for l, _ in lines for k in knots})

    def seen(z):
        return sum(r * filt(l * (1 + z)) for l, r in lines)

    def limit(z):
        t = seen(z)
        return None if t <= 0 else float(np.log10(4 * np.pi * d_l_cm(z) ** 2 * flux / t))

    def n_above(z):
        t = seen(z)
        if t <= 0:
            return 0.0
        x = 4 * np.pi * d_l_cm(z) ** 2 * flux / t / l_star
        return phi * integrate.quad(lambda u: u**alpha * np.exp(-u), x, np.inf, epsabs=0, epsrel=1e-12, limit=200)[0]

    lo, hi = max(edges[0], w_min), min(edges[-1], w_max)
    edges = [lo] + [x for x in edges if lo + 1e-6 < x < hi - 1e-6] + [hi]
    out = []
    for a, b in zip(edges[:-1], edges[1:]):
        lo, hi = max(a, w_min), min(b, w_max)
        if hi > lo:
            z_ref = 0.5 * (lo + hi)
            pts = [lo] + [c for c in cuts if lo < c < hi] + [hi]
            count = sr * sum(
                integrate.quad(lambda z: dv_dz_sr(z) * n_above(z), p, q, epsabs=0, epsrel=1e-11, limit=200)[0]
                for p, q in zip(pts[:-1], pts[1:])
            )
        else:
            z_ref = min(max(0.5 * (a + b), w_min), w_max)
            count = 0.0
        out.append({"z_min": a, "z_max": b, "z_ref": z_ref, "limit": limit(z_ref), "count": count})
    return {"window": [w_min, w_max], "slices": out}


OIII = {"line": 5006.8, "log10_phi_star": -2.85, "log10_l_star": 41.9, "alpha": -1.5, "blended": [(4958.9, 0.33)]}
# 1. one population, a 50 Angstrom top hat at 9210 Angstrom: [OIII] 5007 and 4959 (0.33 of it) are
#    seen over z = 0.8345-0.8445 and 0.8522-0.8623, and the middle slice's middle lies between
f1, k1 = tophat(9210.0, 50.0)
w = [min(k1[0] / l - 1 for l in (5006.8, 4958.9)), max(k1[1] / l - 1 for l in (5006.8, 4958.9))]
edges1 = list(np.linspace(w[0], w[1], 4))
case1 = population_case(f1, k1, 2e-17, 1.0, OIII, edges1)

# 2. two lines through a tabulated filter, the file's slice edges spanning both windows
ROWS = [[9100, 0.0], [9140, 0.55], [9200, 0.86], [9260, 0.78], [9300, 0.08], [9320, 0.0]]
f2, k2 = table(ROWS)
HA = {"line": 6562.8, "log10_phi_star": -2.65, "log10_l_star": 41.6, "alpha": -1.35}
OII = {"line": 3727.4, "log10_phi_star": -2.5, "log10_l_star": 42.0, "alpha": -1.3}
edges2 = [0.39, 0.41, 0.9, 1.47, 1.5]
case2 = {name: population_case(f2, k2, 2.5e-17, 1.8, p, edges2) for name, p in (("H-alpha", HA), ("[OII]", OII))}

print(json.dumps({"narrow_tophat_blend": case1, "table_edges": {"rows": ROWS, "edges": edges2, "populations": case2}}, indent=1))
