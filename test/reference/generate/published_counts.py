#!/usr/bin/env python3
"""Independent counts of the surveys of test/published/deep-field-surveys.test.ts, from
docs/survey-file.md's definitions alone (flat Lambda-CDM without radiation, H0 = 70, Omega_m = 0.3):

- magnitude kind: m = M + 5 log10(D_L / 10 pc) - 2.5 log10(1 + z)
  - 2.5 (beta + 2) log10(lambda_band / ((1 + z) lambda_rest)); a source is counted when M <= m_lim - K;
  the Schechter function in magnitude integrated brightward of M_lim is phi* Gamma(alpha + 1, x)
  with x = 10^(-0.4 (M_lim - M*)); its luminosity density phi* L* Gamma(alpha + 2, x),
  L* = 4 pi (10 pc)^2 x 3631 Jy x 10^(-0.4 M*) erg/s/Hz (the AB zero point of docs/survey-file.md).
- threshold kind: L_lim = 10^limit(z); double Schechter sum of phi_k Gamma(alpha_k + 1, x).
- a table {table: [[z, v], ...]}: linear in z between rows, the end values held beyond.
- a slice's density: the volume-weighted mean over the slice, int dV j / int dV.
Every integral by scipy.integrate.quad (epsrel 1e-11 inside, 1e-10 over z); the incomplete gamma
function by quad of t^(a-1) e^-t, so that no special-function code is shared with skytally.

Run: python3 test/reference/generate/published_counts.py (numpy 2.4.6, scipy 1.17.1 on
Python 3.11.7 here). The test writes the numbers it prints.
"""
import numpy as np
from scipy import integrate

C_KMS = 299792.458
H0, OM = 70.0, 0.3
DH = C_KMS / H0
PC_CM = 3.0856775814913673e18
ARCMIN2_SR = (np.pi / 180 / 60) ** 2
DEG2_SR = (np.pi / 180) ** 2


def e(z):
    return np.sqrt(OM * (1 + z) ** 3 + 1 - OM)


def comoving(z):
    return DH * integrate.quad(lambda x: 1 / e(x), 0, z, epsabs=0, epsrel=1e-13)[0]


def dv_dz_sr(z):
    return DH * comoving(z) ** 2 / e(z)


def dist_mod(z):
    return 5 * np.log10((1 + z) * comoving(z) * 1e6 / 10)


def upper_gamma(a, x):
    """Gamma(a, x) = int_x^inf t^(a-1) e^-t dt (any real a, x > 0)."""
    f = lambda t: t ** (a - 1) * np.exp(-t)
    if x < 1:
        return integrate.quad(f, x, 1, epsabs=0, epsrel=1e-12, limit=400)[0] + integrate.quad(
            f, 1, np.inf, epsabs=0, epsrel=1e-12, limit=400)[0]
    return integrate.quad(f, x, np.inf, epsabs=0, epsrel=1e-12, limit=400)[0]


def table(rows):
    zs = [r[0] for r in rows]
    vs = [r[1] for r in rows]
    return lambda z: float(np.interp(z, zs, vs))


def l_nu(m):
    return 4 * np.pi * (10 * PC_CM) ** 2 * 3631e-23 * 10 ** (-0.4 * m)


def magnitude_survey(sr, m_lim, band, beta, rest, phi, mstar, alpha):
    """Returns count(z0, z1), luminosity density of the detected and of all sources (slice means)."""
    def m_lim_abs(z):
        k = dist_mod(z) - 2.5 * np.log10(1 + z) - 2.5 * (beta + 2) * np.log10(band / ((1 + z) * rest))
        return m_lim - k

    def n(z):
        return phi(z) * upper_gamma(alpha(z) + 1, 10 ** (-0.4 * (m_lim_abs(z) - mstar(z))))

    def j(z, detected):
        a = alpha(z) + 2
        if detected:
            g = upper_gamma(a, 10 ** (-0.4 * (m_lim_abs(z) - mstar(z))))
        else:
            g = integrate.quad(lambda t: t ** (a - 1) * np.exp(-t), 0, np.inf, epsabs=0, epsrel=1e-12, limit=400)[0]
        return phi(z) * l_nu(mstar(z)) * g

    def count(z0, z1):
        return sr * integrate.quad(lambda z: dv_dz_sr(z) * n(z), z0, z1, epsabs=0, epsrel=1e-10, limit=400)[0]

    def density(z0, z1, detected):
        v = integrate.quad(dv_dz_sr, z0, z1, epsabs=0, epsrel=1e-12)[0]
        return integrate.quad(lambda z: dv_dz_sr(z) * j(z, detected), z0, z1, epsabs=0, epsrel=1e-10, limit=400)[0] / v

    return count, density


# K20-like: K_s <= 20 Vega (21.85 AB) over 52 arcmin^2, Cirasuolo et al. 2010-like evolving function
k_count, _ = magnitude_survey(52 * ARCMIN2_SR, 21.85, 21600.0, -2.0, 21600.0,
                              lambda z: 3.5e-3 * np.exp(-((z / 1.70) ** 1.47)),
                              lambda z: -22.26 - (z / 1.78) ** 0.47, lambda z: -1.07)
print('k20 total 0.01-4', repr(k_count(0.01, 4.0)))
print('k20 0.71-0.81', repr(k_count(0.71, 0.81)))

# UDF12-like z ~ 7: J125 <= 29.5 over 4.5 arcmin^2, Bouwens et al. 2015 z ~ 7 (beta = -2: no colour term;
# the band stays redward of Lyman alpha, so the Madau 1995 transmission is 1)
u_count, u_density = magnitude_survey(4.5 * ARCMIN2_SR, 29.5, 12500.0, -2.0, 1600.0,
                                      lambda z: 0.29e-3, lambda z: -20.87, lambda z: -2.06)
print('udf total 6.5-7.5', repr(u_count(6.5, 7.5)))

# GOODS-deep-like z ~ 4: 9000 A <= 27.7 over 65 arcmin^2, beta -1.9, Bouwens et al. 2015 z ~ 4
g_count, g_density = magnitude_survey(65 * ARCMIN2_SR, 27.7, 9000.0, -1.9, 1600.0,
                                      lambda z: 1.97e-3, lambda z: -20.88, lambda z: -1.64)
print('goods total 3.5-4.5', repr(g_count(3.5, 4.5)))
print('goods density detected 3.5-3.75', repr(g_density(3.5, 3.75, True)))
print('goods density all 3.5-3.75', repr(g_density(3.5, 3.75, False)))

# COSMOS-like mass-limited: Davidzon et al. 2017-like double Schechter tables, mass limit
# log10(-3.23e7 (1 + z) + 7.83e7 (1 + z)^2), 1.5 deg^2
ZS = [0.35, 0.65, 0.95, 1.3, 1.75]
lms = table(list(zip(ZS, [10.78, 10.77, 10.56, 10.62, 10.51])))
p1 = table(list(zip(ZS, [1.187e-3, 1.070e-3, 1.428e-3, 1.069e-3, 0.969e-3])))
a1 = table(list(zip(ZS, [-1.38, -1.36, -1.31, -1.28, -1.28])))
p2 = table(list(zip(ZS, [1.92e-3, 1.68e-3, 2.19e-3, 1.21e-3, 0.64e-3])))
a2 = table(list(zip(ZS, [-0.43, 0.03, 0.51, 0.29, 0.82])))


def mass_lim(z):
    return np.log10(-3.23e7 * (1 + z) + 7.83e7 * (1 + z) ** 2)


def mass_n(z):
    x = 10 ** (mass_lim(z) - lms(z))
    return p1(z) * upper_gamma(a1(z) + 1, x) + p2(z) * upper_gamma(a2(z) + 1, x)


def mass_rho(z):
    g = lambda a: integrate.quad(lambda t: t ** (a + 1) * np.exp(-t), 0, np.inf, epsrel=1e-12, limit=400)[0]
    return 10 ** lms(z) * (p1(z) * g(a1(z)) + p2(z) * g(a2(z)))


def mass_count(z0, z1):
    # the table rows are kinks: integrate piece by piece between them
    pts = [z0] + [z for z in ZS if z0 < z < z1] + [z1]
    return 1.5 * DEG2_SR * sum(integrate.quad(lambda z: dv_dz_sr(z) * mass_n(z), a, b, epsabs=0, epsrel=1e-10,
                                              limit=400)[0] for a, b in zip(pts, pts[1:]))


def mass_density(z0, z1):
    pts = [z0] + [z for z in ZS if z0 < z < z1] + [z1]
    v = integrate.quad(dv_dz_sr, z0, z1, epsabs=0, epsrel=1e-12)[0]
    return sum(integrate.quad(lambda z: dv_dz_sr(z) * mass_rho(z), a, b, epsabs=0, epsrel=1e-10, limit=400)[0]
               for a, b in zip(pts, pts[1:])) / v


print('mass total 0.2-2', repr(mass_count(0.2, 2.0)))
print('mass 0.2-0.5', repr(mass_count(0.2, 0.5)))
print('mass density all 0.2-0.5', repr(mass_density(0.2, 0.5)))
print('mass density all 0.8-1.1', repr(mass_density(0.8, 1.1)))
print('mass density all 1.5-2', repr(mass_density(1.5, 2.0)))
