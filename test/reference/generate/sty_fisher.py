#!/usr/bin/env python3
"""Expected Fisher sigmas of the STY estimator (Sandage, Tammann & Yahil 1979) and of the extended
unbinned Poisson likelihood for one invented UV field (test/forecast/sty-spread.test.ts), from
docs/survey-file.md's definitions alone (flat Lambda-CDM without radiation; shares no code with
skytally). The field: 120 arcmin^2, 3 < z < 5 in four slices, m_lim = 27.5 AB in a band at
8500 Angstrom, beta = -1.7, M* = -20.9 AB at rest 1600 Angstrom, phi* = 1e-3 Mpc^-3, alpha = -1.7;
m = M + 5 log10(D_L / 10 pc) - 2.5 log10(1 + z) - 2.5 (beta + 2) log10(band / ((1 + z) rest)).
- extended likelihood: F = int dz int dM lambda g g^T, lambda the expected density of sources in
  (z, M), g the derivatives of ln lambda in (log10 phi*, M*, alpha);
- STY conditions on each source's redshift: F = int dz N(z) Cov_z(g) over (M*, alpha), Cov_z the
  covariance of g under the distribution of M at z (the information in how many sources lie at each
  redshift is left out, so its sigmas are larger).
Gauss-Legendre: 60 nodes per slice in z, 400 in M from M* - 10 to the limit; comoving distance by
scipy.integrate.quad (epsrel 1e-12). Writes JSON to stdout (scipy 1.17.1, numpy 2.4.6, Python 3.11).

Run: python3 test/reference/generate/sty_fisher.py > test/reference/sty_fisher.json
"""
import json

import numpy as np
from numpy.polynomial.legendre import leggauss
from scipy import integrate

C_KMS = 299792.458
H0, OM = 70.0, 0.3
AREA_SR = 120 / 3600 * (np.pi / 180) ** 2
M_LIM, BAND, BETA, REST = 27.5, 8500.0, -1.7, 1600.0
PHI, MS, AL = 1e-3, -20.9, -1.7
LN10 = np.log(10)


def e(z):
    return np.sqrt(OM * (1 + z) ** 3 + 1 - OM)


def comoving(z):
    return C_KMS / H0 * integrate.quad(lambda x: 1 / e(x), 0, z, epsabs=0, epsrel=1e-12)[0]


def k_corr(z):
    dl_pc = (1 + z) * comoving(z) * 1e6
    return 5 * np.log10(dl_pc / 10) - 2.5 * np.log10(1 + z) - 2.5 * (BETA + 2) * np.log10(BAND / ((1 + z) * REST))


full = np.zeros((3, 3))
sty = np.zeros((2, 2))
zx, zw = leggauss(60)
mx, mw = leggauss(400)
for a, b in [(3, 3.5), (3.5, 4), (4, 4.5), (4.5, 5)]:
    for xi, wi in zip(zx, zw):
        z = 0.5 * (a + b) + 0.5 * (b - a) * xi
        wz = 0.5 * (b - a) * wi
        dv = AREA_SR * C_KMS / H0 * comoving(z) ** 2 / e(z)
        hi, lo = M_LIM - k_corr(z), MS - 10
        m = 0.5 * (hi + lo) + 0.5 * (hi - lo) * mx
        w = 0.5 * (hi - lo) * mw
        y = 10 ** (0.4 * (MS - m))
        lam = dv * 0.4 * LN10 * PHI * y ** (AL + 1) * np.exp(-y) * w
        g = np.array([LN10 * np.ones_like(m), 0.4 * LN10 * ((AL + 1) - y), 0.4 * LN10 * (MS - m)])
        full += wz * np.einsum("ik,jk,k->ij", g, g, lam)
        n = lam.sum()
        mu = g[1:] @ lam / n
        sty += wz * n * (np.einsum("ik,jk,k->ij", g[1:], g[1:], lam) / n - np.outer(mu, mu))
s_full = np.sqrt(np.diag(np.linalg.inv(full)))
s_sty = np.sqrt(np.diag(np.linalg.inv(sty)))
print(json.dumps({
    "extended": {"log10_phi_star": s_full[0], "m_star": s_full[1], "alpha": s_full[2]},
    "sty": {"m_star": s_sty[0], "alpha": s_sty[1]},
}, indent=2))
