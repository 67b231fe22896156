#!/usr/bin/env python3
"""Independent counts of a slitless line survey whose blend ratio b(z) varies with redshift (a
`blend_ratio` table or expression in z; test/selection/blend-in-z.test.ts), from docs/survey-file.md's
definitions alone (flat Lambda-CDM without radiation; shares no code with skytally):
- the measured flux F = L (1 + b(z)) 10^(-0.4 A) / (4 pi D_L^2), so the limit in the line's own
  luminosity is L_lim(z) = 4 pi D_L^2 F_lim / ((1 + b(z)) 10^(-0.4 A)); the luminosity function is
  intrinsic and unblended;
- an equivalent-width cut keeps P(W > W_cut / B(z)) (rest frame) or P(W > W_cut / ((1 + z) B(z)))
  (observed frame) of the sources, B(z) = 1 + b(z), W the line's own rest-frame width: lognormal
  P(W > w) = erfc((log10 w - log10 W_m) / (s sqrt 2)) / 2, or a table linear between its rows with
  its end values held.
Comoving distance, dV/dz and the Schechter integral above the limit by scipy.integrate.quad (epsrel
1e-12 inside, 1e-11 over z, cut at the blend table's rows and where the width cut crosses a row of
the width table). Writes JSON to stdout (scipy 1.17.1, numpy, Python 3.11).

Run: python3 test/reference/generate/blend_in_z.py > test/reference/blend_in_z.json
"""
import json

import numpy as np
from scipy import integrate, optimize, special

C_KMS = 299792.458
H0, OM = 70.0, 0.3
MPC_CM = 3.0856775814913673e24
AREA = 10.0  # deg^2
FLUX = 2e-16  # erg/s/cm^2
PHI, L_STAR, ALPHA = 10**-2.6, 10**42.6, -1.4
ATT = 1.0  # mag
EDGES = [0.9, 1.2, 1.5, 1.8]


def e(z):
    return np.sqrt(OM * (1 + z) ** 3 + 1 - OM)


def comoving(z):
    return C_KMS / H0 * integrate.quad(lambda x: 1 / e(x), 0, z, epsabs=0, epsrel=1e-13)[0]


def dv_dz(z):
    return AREA * (np.pi / 180) ** 2 * C_KMS / H0 * comoving(z) ** 2 / e(z)


def n_above(x_min):
    """phi* times the integral of t^alpha e^-t from x_min (= L_lim / L*) to infinity."""
    return PHI * integrate.quad(lambda t: t**ALPHA * np.exp(-t), x_min, np.inf, epsabs=0, epsrel=1e-12, limit=200)[0]


def table(rows):
    zs = [r[0] for r in rows]
    vs = [r[1] for r in rows]
    return lambda z: float(np.interp(z, zs, vs))


def lognormal_above(median, sigma_dex):
    return lambda w: 1.0 if w <= 0 else 0.5 * special.erfc((np.log10(w) - np.log10(median)) / (sigma_dex * np.sqrt(2)))


def table_above(rows):
    ws = [r[0] for r in rows]
    fs = [r[1] for r in rows]
    return lambda w: 1.0 if w <= 0 else float(np.interp(w, ws, fs))


def count(blend, lo, hi, points=(), kept=lambda z: 1.0):
    def f(z):
        d_l = (1 + z) * comoving(z) * MPC_CM
        l_lim = 4 * np.pi * d_l**2 * FLUX / ((1 + blend(z)) * 10 ** (-0.4 * ATT))
        return dv_dz(z) * kept(z) * n_above(l_lim / L_STAR)

    inside = sorted(p for p in points if lo < p < hi)
    cuts = [lo, *inside, hi]
    return sum(integrate.quad(f, a, b, epsabs=0, epsrel=1e-11, limit=400)[0] for a, b in zip(cuts, cuts[1:]))


def crossings(g, lo, hi, targets):
    """Where g(z) = t for each target t (g monotonic between its own cuts: sampled then bracketed)."""
    zs = np.linspace(lo, hi, 401)
    out = []
    for t in targets:
        gs = [g(z) - t for z in zs]
        for k in range(len(zs) - 1):
            if gs[k] * gs[k + 1] < 0:
                out.append(optimize.brentq(lambda z: g(z) - t, zs[k], zs[k + 1], xtol=1e-15, rtol=1e-15))
    return out


cases = {}
TABLE = [[0.9, 0.35], [1.3, 0.3], [1.8, 0.15]]
EXPR = '0.45 - 0.14*z'
blend_table = table(TABLE)
blend_expr = lambda z: 0.45 - 0.14 * z
rows = [r[0] for r in TABLE]

cases['table'] = {'blend_ratio': {'table': TABLE}, 'slices': [count(blend_table, a, b, rows) for a, b in zip(EDGES, EDGES[1:])]}
cases['expression'] = {'blend_ratio': EXPR, 'slices': [count(blend_expr, a, b) for a, b in zip(EDGES, EDGES[1:])]}

# an observed-frame cut of 100 A on a lognormal of median 60 A and 0.3 dex
ln = lognormal_above(60.0, 0.3)
cases['table_observed_lognormal_cut'] = {
    'blend_ratio': {'table': TABLE},
    'equivalent_width_cut': {'observed': 100},
    'equivalent_widths': {'model': 'lognormal', 'median': 60, 'sigma_dex': 0.3},
    'slices': [
        count(blend_table, a, b, rows, kept=lambda z: ln(100.0 / ((1 + z) * (1 + blend_table(z)))))
        for a, b in zip(EDGES, EDGES[1:])
    ],
}

# a rest-frame cut of 50 A on a table of the fraction above: 50 / B(z) crosses the row at 40 A
WT = [[0, 1], [20, 0.8], [40, 0.5], [80, 0.2], [200, 0]]
tb = table_above(WT)
g = lambda z: 50.0 / (1 + blend_expr(z))
kinks = crossings(g, EDGES[0], EDGES[-1], [w for w, _ in WT if w > 0])
cases['expression_rest_table_cut'] = {
    'blend_ratio': EXPR,
    'equivalent_width_cut': {'rest': 50},
    'equivalent_widths': {'model': 'table', 'table': WT},
    'width_row_crossed_at_z': kinks,
    'slices': [count(blend_expr, a, b, kinks, kept=lambda z: tb(g(z))) for a, b in zip(EDGES, EDGES[1:])],
}

print(
    json.dumps(
        {
            'source': 'test/reference/generate/blend_in_z.py (scipy quad)',
            'survey': {
                'h0': H0,
                'omega_m': OM,
                'area_deg2': AREA,
                'limit_cgs': FLUX,
                'log10_phi_star': -2.6,
                'log10_l_star': 42.6,
                'alpha': ALPHA,
                'attenuation_mag': ATT,
                'edges': EDGES,
            },
            'cases': cases,
        },
        indent=1,
    )
)
