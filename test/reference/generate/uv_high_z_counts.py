#!/usr/bin/env python3
"""Independent numbers of test/published/ultraviolet-and-high-redshift.test.ts, from
docs/survey-file.md's definitions alone (flat Lambda-CDM without radiation, H0 = 70, Omega_m = 0.3):

- K(z) = 5 log10(D_L / 10 pc) - 2.5 log10(1 + z) - 2.5 (beta + 2) log10(band / ((1 + z) rest)),
  m = M + K; the intergalactic transmission is 1 in every window used here (the band lies redward
  of Lyman alpha (1 + z) there), so it is left out;
- the Schechter function in magnitude, phi(M) = 0.4 ln 10 phi* 10^(0.4 (alpha+1) (M*-M))
  exp(-10^(0.4 (M*-M))); N = area int dz dV/dz/dOmega int dM phi(M) c(m), with the logistic
  completeness c(m) = 1 / (1 + exp((m - half) / width)) where the file gives one;
- test/fixtures/galex-nuv-counts.yaml (first slice, z = 0.001-0.85): the count to NUV 23.5 and the
  count at 22.5 <= m < 23.0 (one histogram bin), by the upper incomplete gamma function,
  Gamma(s, x) = (Gamma(s + 1, x) - x^s e^-x) / s for s = alpha + 1 < 0; also the bin with M*
  held at its z = 0 value (no evolution);
- test/fixtures/jwst-z9-dropouts.yaml: the count (and its first slice), and the Poisson-only Fisher
  matrix of the unbinned likelihood, F_ij = int dz int dM lambda g_i g_j with lambda the integrand
  of N and g the derivatives of ln phi with respect to constant offsets of log10 phi* (ln 10), M*
  (0.4 ln 10 ((alpha + 1) - x), x = 10^(0.4 (M* - M))) and alpha (ln x): sigma_i = sqrt((F^-1)_ii);
- test/fixtures/udf12-z9-12.yaml: the first slice's count (z = 8.5-10).

Every integral by scipy.integrate.quad (epsrel 1e-10 or finer). Run: python3
test/reference/generate/uv_high_z_counts.py (numpy 2.4.6, scipy 1.17.1 here). The test writes the
numbers it prints.
"""
import numpy as np
from scipy import integrate, special

C_KMS = 299792.458
H0, OM = 70.0, 0.3
LN10 = np.log(10.0)


def hubble(z):
    return H0 * np.sqrt(OM * (1 + z) ** 3 + 1 - OM)


def comoving(z):
    return integrate.quad(lambda x: C_KMS / hubble(x), 0, z, epsabs=0, epsrel=1e-13)[0]


def k_and_dv(z, band, rest, beta, sr):
    dc = comoving(z)
    dl = dc * (1 + z)
    k = 5 * np.log10(dl * 1e6 / 10) - 2.5 * np.log10(1 + z) - 2.5 * (beta + 2) * np.log10(band / ((1 + z) * rest))
    return k, sr * C_KMS / hubble(z) * dc**2


def galex(z0, z1, m_lo, m_hi, evolve=True):
    sr = (np.pi / 180) ** 2

    def brighter(ms, alpha, phis, m_lim):
        x = 10 ** (0.4 * (ms - m_lim))
        s = alpha + 1
        return phis * (special.gammaincc(s + 1, x) * special.gamma(s + 1) - x**s * np.exp(-x)) / s

    def f(z):
        k, dv = k_and_dv(z, 2271.0, 2271.0, -1.8, sr)
        ms = -18.23 - (6.25 * np.log10(1 + z) if evolve else 0.0)
        n = brighter(ms, -1.16, 4.07e-3, m_hi - k) - (brighter(ms, -1.16, 4.07e-3, m_lo - k) if m_lo is not None else 0)
        return n * dv

    return integrate.quad(f, z0, z1, epsabs=0, epsrel=1e-11, limit=400)[0]


def bouwens(z):
    return 0.47e-3 * 10 ** (-0.27 * (z - 6)), -20.95 + 0.01 * (z - 6), -1.87 - 0.10 * (z - 6)


def high_z(z0, z1, m_lim, arcmin2, band, beta, completeness, moments=None):
    sr = arcmin2 / 3600 * (np.pi / 180) ** 2

    def inner(z):
        k, dv = k_and_dv(z, band, 1600.0, beta, sr)
        phis, ms, alpha = bouwens(z)

        def g(m_abs):
            x = 10 ** (0.4 * (ms - m_abs))
            phi = 0.4 * LN10 * phis * x ** (alpha + 1) * np.exp(-x)
            c = 1.0 if completeness is None else 1 / (1 + np.exp((m_abs + k - completeness[0]) / completeness[1]))
            w = phi * c * dv
            if moments is None:
                return w
            d = [LN10, 0.4 * LN10 * ((alpha + 1) - x), np.log(x)]
            return w * d[moments[0]] * d[moments[1]]

        return integrate.quad(g, -30, m_lim - k, epsabs=0, epsrel=1e-11, limit=400, points=[ms])[0]

    return integrate.quad(inner, z0, z1, epsabs=0, epsrel=1e-10)[0]


if __name__ == '__main__':
    print('galex-nuv-counts slice 1 count to 23.5:', repr(galex(0.001, 0.85, None, 23.5)))
    print('galex-nuv-counts slice 1 22.5-23.0:', repr(galex(0.001, 0.85, 22.5, 23.0)))
    print('galex-nuv-counts slice 1 22.5-23.0 without evolution:', repr(galex(0.001, 0.85, 22.5, 23.0, evolve=False)))
    jw = dict(m_lim=29.5, arcmin2=40.0, band=15000.0, beta=-2.2, completeness=(29.3, 0.2))
    print('jwst-z9-dropouts count:', repr(high_z(8.5, 10.5, **jw)), 'first slice:', repr(high_z(8.5, 9.0, **jw)))
    fisher = np.zeros((3, 3))
    for i in range(3):
        for j in range(i, 3):
            fisher[i, j] = fisher[j, i] = high_z(8.5, 10.5, moments=(i, j), **jw)
    print('jwst-z9-dropouts Poisson-only sigmas (log10_phi_star, m_star, alpha):', np.sqrt(np.diag(np.linalg.inv(fisher))).tolist())
    print('udf12-z9-12 first slice:', repr(high_z(8.5, 10.0, 29.5, 4.5, 15400.0, -2.0, None)))
