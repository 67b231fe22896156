#!/usr/bin/env python3
"""Independent counts of the two narrow-band Lyman-alpha surveys of
test/published/lyman-alpha-surveys.test.ts, from docs/survey-file.md's definitions (flat
Lambda-CDM without radiation; F = T L / (4 pi D_L^2); top hat T = 1 on center +- fwhm/2; gaussian T
cut at center +- 1.5 fwhm). Comoving distance, dV/dz and the Schechter integral above the limit by
scipy.integrate.quad (epsrel 1e-12 inside, 1e-10 over z). Shares no code with skytally.
The test writes the two numbers it prints (scipy 1.17.1, numpy, Python 3).

Run: python3 test/reference/generate/lyman_alpha_counts.py
"""
import numpy as np
from scipy import integrate

C_KMS = 299792.458
H0, OM = 70.0, 0.3
MPC_CM = 3.0856775814913673e24
LYA = 1215.67


def e(z):
    return np.sqrt(OM * (1 + z) ** 3 + 1 - OM)


def comoving(z):
    return C_KMS / H0 * integrate.quad(lambda x: 1 / e(x), 0, z, epsabs=0, epsrel=1e-12)[0]


def dv_dz(z, area_deg2):
    return area_deg2 * (np.pi / 180) ** 2 * C_KMS / H0 * comoving(z) ** 2 / e(z)


def n_above(l_min, phi, l_star, alpha):
    return phi * integrate.quad(lambda t: t**alpha * np.exp(-t), l_min / l_star, np.inf, epsrel=1e-12, limit=200)[0]


def count(area, flux, transmission, z_lo, z_hi, phi, l_star, alpha):
    def f(z):
        t = transmission(LYA * (1 + z))
        if t <= 0:
            return 0.0
        d_l = (1 + z) * comoving(z) * MPC_CM
        return dv_dz(z, area) * n_above(4 * np.pi * d_l**2 * flux / t, phi, l_star, alpha)

    return integrate.quad(f, z_lo, z_hi, epsrel=1e-10, limit=400)[0]


# Gronwall et al. 2007-like: 992 arcmin^2, 1.5e-17, top hat 4990/50 A
print('gronwall', repr(count(992 / 3600, 1.5e-17, lambda l: 1.0 if abs(l - 4990) <= 25 else 0.0,
                             4965 / LYA - 1, 5015 / LYA - 1, 1.28e-3, 10**42.66, -1.36)))
# Ouchi et al. 2008-like: 1 deg^2, 7e-18, gaussian 8150/120 A cut at +- 1.5 fwhm
SIG = 120 / (2 * np.sqrt(2 * np.log(2)))
print('ouchi', repr(count(1.0, 7e-18, lambda l: np.exp(-(l - 8150) ** 2 / (2 * SIG**2)) if abs(l - 8150) <= 180 else 0.0,
                          (8150 - 180) / LYA - 1, (8150 + 180) / LYA - 1, 7.7e-4, 6.8e42, -1.5)))
