#!/usr/bin/env python3
"""Independent counts of a magnitude-limited survey whose window starts at z = 0 with a steep faint
end (test/counts/steep-faint-end.test.ts), from docs/survey-file.md's definitions alone (flat
Lambda-CDM without radiation; shares no code with skytally):
- m = M + 5 log10(D_L / 10 pc) - 2.5 log10(1 + z) for beta = -2 (the colour term vanishes), so the
  limit m_lim in absolute magnitude is M_lim(z) = m_lim - 5 log10(D_L / 10 pc) + 2.5 log10(1 + z);
- the count is area x int dz dV/dz phi* Gamma(alpha + 1, x), x = 10^(0.4 (M* - M_lim)).
Near z = 0 the integrand grows as z^(2 alpha + 4) (D_L ~ z, L_lim ~ z^2, n ~ L_lim^(alpha + 1),
dV/dz ~ z^2): integrable for alpha > -2.5, so the z integral is taken in u = z^(1/20), which makes
it smooth (u^(20 (2 alpha + 5) - 1)). Comoving distance by scipy.integrate.quad (epsrel 1e-13),
Gamma(a, x) by mpmath.gammainc (30 digits), the z integral by quad (epsrel 1e-11). Writes JSON to
stdout (scipy 1.17.1, mpmath 1.3.0, numpy 2.4.6, Python 3.11).

Run: python3 test/reference/generate/steep_faint_end.py > test/reference/steep_faint_end.json
"""
import json

import mpmath as mp
import numpy as np
from scipy import integrate

mp.mp.dps = 30
C_KMS = 299792.458
H0, OM = 70.0, 0.3
DEG2_SR = (np.pi / 180) ** 2
AREA_DEG2 = 1.0
M_LIM, M_STAR, PHI_STAR = 22.0, -21.0, 5.0e-3


def e(z):
    return np.sqrt(OM * (1 + z) ** 3 + 1 - OM)


def comoving(z):
    return C_KMS / H0 * integrate.quad(lambda x: 1 / e(x), 0, z, epsabs=0, epsrel=1e-13)[0]


def dv_dz_sr(z):
    return C_KMS / H0 * comoving(z) ** 2 / e(z)


def density(z, alpha):
    dl_pc = (1 + z) * comoving(z) * 1e6
    m_abs = M_LIM - 5 * np.log10(dl_pc / 10) + 2.5 * np.log10(1 + z)
    x = 10 ** (0.4 * (M_STAR - m_abs))
    return PHI_STAR * float(mp.gammainc(alpha + 1, x, mp.inf))


def count(z0, z1, alpha, k=20):
    def f(u):
        z = u**k
        return AREA_DEG2 * DEG2_SR * dv_dz_sr(z) * density(z, alpha) * k * u ** (k - 1)

    return integrate.quad(f, z0 ** (1 / k), z1 ** (1 / k), epsabs=0, epsrel=1e-11, limit=400)[0]


cases = []
for alpha in (-2.2, -2.4, -2.45, -2.49):
    for z0 in (0.0, 1e-4):
        cases.append({"alpha": alpha, "z_min": z0, "z_max": 0.01, "count": count(z0, 0.01, alpha)})
print(json.dumps({"area_deg2": AREA_DEG2, "m_lim": M_LIM, "m_star": M_STAR, "phi_star": PHI_STAR, "cases": cases}, indent=2))
