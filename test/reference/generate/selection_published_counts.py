#!/usr/bin/env python3
"""Independent counts of the surveys of test/published/selection-effects-surveys.test.ts, from
docs/survey-file.md's definitions alone (flat Lambda-CDM without radiation; shares no code with
skytally):
- line_flux: the measured flux F = T L (1 + b) 10^(-0.4 A) / (4 pi D_L^2) (b the blend ratio, A the
  attenuation in mag, T = 1 on center +- fwhm/2 for a top hat, a gaussian cut at center +- 1.5 fwhm),
  so L_lim = 4 pi D_L^2 F_lim / (T (1 + b) 10^(-0.4 A)); the luminosity function intrinsic and
  unblended;
- magnitude: m = M + 5 log10(D_L / 10 pc) - 2.5 log10(1 + z)
  - 2.5 (beta + 2) log10(lambda_band / ((1 + z) lambda_rest)), limits in Vega converted by
  vega_to_ab, the redshift selection S(z) multiplying the integrand.
Comoving distance, dV/dz and the Schechter integral above the limit by scipy.integrate.quad (epsrel
1e-12 inside, 1e-10 over z). The test writes the numbers it prints (scipy 1.10.1, numpy, Python 3.11).

Run: /usr/bin/python3 test/reference/generate/selection_published_counts.py
"""
import numpy as np
from scipy import integrate

C_KMS = 299792.458
H0, OM = 70.0, 0.3
MPC_CM = 3.0856775814913673e24
HALPHA = 6562.8
LYA = 1215.67


def e(z):
    return np.sqrt(OM * (1 + z) ** 3 + 1 - OM)


def comoving(z):
    return C_KMS / H0 * integrate.quad(lambda x: 1 / e(x), 0, z, epsabs=0, epsrel=1e-12)[0]


def dv_dz(z, area_deg2):
    return area_deg2 * (np.pi / 180) ** 2 * C_KMS / H0 * comoving(z) ** 2 / e(z)


def n_above(x_min, phi, alpha):
    """phi* times the integral of t^alpha e^-t from x_min (= L_lim / L*) to infinity."""
    return phi * integrate.quad(lambda t: t**alpha * np.exp(-t), x_min, np.inf, epsrel=1e-12, limit=200)[0]


def line_count(area, flux, line, transmission, z_lo, z_hi, phi, l_star, alpha, blend=0.0, att=0.0):
    def f(z):
        t = transmission(line * (1 + z))
        if t <= 0:
            return 0.0
        d_l = (1 + z) * comoving(z) * MPC_CM
        l_lim = 4 * np.pi * d_l**2 * flux / (t * (1 + blend) * 10 ** (-0.4 * att))
        return dv_dz(z, area) * n_above(l_lim / l_star, phi, alpha)

    return integrate.quad(f, z_lo, z_hi, epsrel=1e-10, limit=400)[0]


def tophat(center, fwhm):
    return lambda lam: 1.0 if abs(lam - center) <= fwhm / 2 else 0.0


def magnitude_count(area, m_lim, band, rest, beta, z_lo, z_hi, phi_of_z, m_star_of_z, alpha, selection):
    def f(z):
        d_l_pc = (1 + z) * comoving(z) * 1e6
        k = 5 * np.log10(d_l_pc / 10) - 2.5 * np.log10(1 + z) - 2.5 * (beta + 2) * np.log10(band / ((1 + z) * rest))
        x_min = 10 ** (-0.4 * (m_lim - k - m_star_of_z(z)))  # L_lim / L* of the limit's absolute magnitude
        return dv_dz(z, area) * selection(z) * n_above(x_min, phi_of_z(z), alpha)

    return integrate.quad(f, z_lo, z_hi, epsrel=1e-10, limit=400)[0]


# HiZELS-like H-alpha at z = 2.23: 0.6 deg^2, 1e-16 (H-alpha + [NII]), top hat 21210/210 A, Sobral et al. 2013
for b in (0.0, 0.2):
    print('hizels_z2.23 blend', b, repr(line_count(0.6, 1e-16, HALPHA, tophat(21210, 210), 21105 / HALPHA - 1,
                                                   21315 / HALPHA - 1, 10**-2.78, 10**42.87, -1.59, b, 1.0)))
# HiZELS-like H-alpha at z = 0.84: 1.3 deg^2, 8e-17, top hat 12110/150 A
for b in (0.0, 0.33):
    print('hizels_z0.84 blend', b, repr(line_count(1.3, 8e-17, HALPHA, tophat(12110, 150), 12035 / HALPHA - 1,
                                                   12185 / HALPHA - 1, 10**-2.47, 10**42.25, -1.56, b, 1.0)))


def split_line_count(area, flux, lo, hi, phi, l_star, alpha, blend, att):
    """The same narrow-band count with [NII] 6548.05 and 6583.45 placed one by one (1 : 3 of the
    blend) through the top hat lo-hi, each line counted where it falls inside: what the blend at
    H-alpha's own transmission (skytally's documented rule) approximates; for docs/survey-file.md."""
    lines = [(HALPHA, 1.0), (6583.45, 0.75 * blend), (6548.05, 0.25 * blend)]

    def f(z):
        w = sum(r for lam, r in lines if lo <= lam * (1 + z) <= hi)
        if w <= 0:
            return 0.0
        d_l = (1 + z) * comoving(z) * MPC_CM
        return dv_dz(z, area) * n_above(4 * np.pi * d_l**2 * flux / (w * 10 ** (-0.4 * att)) / l_star, phi, alpha)

    cuts = sorted({lo / lam - 1 for lam, _ in lines} | {hi / lam - 1 for lam, _ in lines})
    return integrate.quad(f, cuts[0], cuts[-1], epsrel=1e-10, limit=400, points=cuts[1:-1])[0]


print('hizels_z2.23 [NII] lines one by one', repr(split_line_count(0.6, 1e-16, 21105, 21315, 10**-2.78, 10**42.87,
                                                                  -1.59, 0.2, 1.0)))
print('hizels_z0.84 [NII] lines one by one', repr(split_line_count(1.3, 8e-17, 12035, 12185, 10**-2.47, 10**42.25,
                                                                  -1.56, 0.33, 1.0)))
# Ouchi et al. 2010-like z = 6.6 LAEs: 1 deg^2, 6.8e-18, NB921 as a top hat 9196/132 A
print('ouchi_z6.6', repr(line_count(1.0, 6.8e-18, LYA, tophat(9196, 132), 9130 / LYA - 1, 9262 / LYA - 1,
                                    8.5e-4, 4.4e42, -1.5)))
# sBzK-like: K(Vega) < 20 (AB 21.85) per arcmin^2 at 1.4 < z < 2.5, Cirasuolo et al. 2010, S(z) = 0.8
for beta in (-2.0, -1.5):
    print('bzk beta', beta, repr(magnitude_count(1 / 3600, 20 + 1.85, 22000, 22000, beta, 1.4, 2.5,
                                                 lambda z: 3.5e-3 * np.exp(-((z / 1.70) ** 1.47)),
                                                 lambda z: -22.26 - (z / 1.78) ** 0.47, -1.07, lambda z: 0.8)))
